import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { bytesToHex, examples } from './examples';
import { annotatedExample } from './print-doc-examples';

const doc = readFileSync(new URL('../../../docs/feed-protocol.md', import.meta.url), 'utf8');

/** The ```text block after `<!-- example: name -->`. */
function docBlock(name: string): string {
  const m = new RegExp(`<!-- example: ${name} -->\\n\`\`\`text\\n([\\s\\S]*?)\\n\`\`\``).exec(doc);
  if (!m) throw new Error(`docs/feed-protocol.md has no example '${name}'`);
  return m[1]!;
}

describe('docs/feed-protocol.md', () => {
  it.each(examples)('shows the $name example byte for byte', ({ name, bytes }) => {
    const hex = docBlock(name).split('\n').map((line) => line.split(/\s{3,}/)[0]!.replace(/\s+/g, '')).join('');
    // Reference: tests/fixtures/protocol/examples.json (Python struct encoding of the documented layout).
    expect(hex).toBe(bytesToHex(bytes));
    // And the annotations are the current ones (regenerate with print-doc-examples.ts).
    expect(docBlock(name)).toBe(annotatedExample(name));
  });
});
