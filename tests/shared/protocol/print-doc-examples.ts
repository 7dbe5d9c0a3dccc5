// Prints the annotated hex examples of docs/feed-protocol.md from the fixture
// tests/fixtures/protocol/examples.json (run: npx tsx tests/shared/protocol/print-doc-examples.ts).
// doc-examples.test.ts checks that the document still shows exactly these bytes.
import { examples } from './examples';

const hex = (b: Uint8Array) => Array.from(b, (x) => x.toString(16).padStart(2, '0')).join(' ');

/** Field widths after the 8-byte header, per frame type; -1 = str8 (length byte + text), -2 = rest. */
const layouts: Record<string, Array<[string, number]>> = {
  hello: [['resumeFromSeq u32', 4], ['sampleRateHz f64', 8], ['channelCount u16', 2], ['reserved u16', 2], ['rigId str8', -1],
    ['bridgeSessionId str8', -1], ['startTime str8', -1], ['channelNames[0] str8', -1], ['channelNames[1] str8', -1],
    ['channelNames[2] str8', -1], ['units[0] str8', -1], ['units[1] str8', -1], ['units[2] str8', -1]],
  chunk: [['seq u32', 4], ['firstSample u64 (lo, hi)', 8], ['channelCount u16', 2], ['sampleCount u16', 2],
    ['sample 0: C3, Cz, C4 (f32)', 12], ['sample 1: C3, Cz, C4 (f32)', 12]],
  cue: [['seq u32', 4], ['sample u64', 8], ['cueId u32', 4], ['label str8', -1]],
  gap: [['seq u32', 4], ['lastSeq u32', 4], ['fromSample u64', 8], ['toSample u64', 8], ['reason u8', 1]],
  keepalive: [['sentAtMs f64', 8]],
  ack: [['seq u32', 4], ['nextSample u64', 8]],
  refuse: [['code u16', 2], ['reason str8', -1]],
};

export function annotatedExample(name: string): string {
  const ex = examples.find((e) => e.name === name)!;
  const b = ex.bytes;
  const lines = [`${hex(b.subarray(0, 8))}   header: "AF", version 1, type 0x${b[3]!.toString(16).padStart(2, '0')}, payload ${b.length - 8} bytes`];
  let o = 8;
  for (const [label, width] of layouts[name]!) {
    const w = width === -1 ? 1 + b[o]! : width;
    const part = b.subarray(o, o + w);
    const text = width === -1 ? ` "${new TextDecoder().decode(part.subarray(1))}"` : '';
    lines.push(`${hex(part)}   ${label}${text}`);
    o += w;
  }
  if (o !== b.length) throw new Error(`${name}: layout covers ${o} of ${b.length} bytes`);
  return lines.join('\n');
}

if (process.argv[1]?.endsWith('print-doc-examples.ts')) {
  for (const e of examples) console.log(`<!-- example: ${e.name} -->\n\`\`\`text\n${annotatedExample(e.name)}\n\`\`\`\n`);
}
