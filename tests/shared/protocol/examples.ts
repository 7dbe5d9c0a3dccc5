// The example frames of tests/fixtures/protocol/examples.json as typed frames (JSON cannot hold
// NaN or a Float32Array), for the codec and document tests.
import fixture from '../../fixtures/protocol/examples.json';
import type { FeedFrame } from '../../../shared/protocol';

export interface Example { name: string; frame: FeedFrame; bytes: Uint8Array }

export function hexToBytes(hex: string): Uint8Array {
  const clean = hex.replace(/\s+/g, '');
  const out = new Uint8Array(clean.length / 2);
  for (let i = 0; i < out.length; i++) out[i] = parseInt(clean.slice(2 * i, 2 * i + 2), 16);
  return out;
}

export function bytesToHex(bytes: Uint8Array): string {
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

function toFrame(raw: Record<string, unknown>): FeedFrame {
  if (raw.type !== 'chunk') return raw as unknown as FeedFrame;
  const values = (raw.samples as Array<number | string>).map((v) => (typeof v === 'string' ? Number(v) : v));
  return { ...(raw as unknown as FeedFrame & { type: 'chunk' }), samples: Float32Array.from(values) };
}

export const fixtureSource: string = fixture.source;

export const examples: Example[] = fixture.examples.map((e) => ({
  name: e.name,
  frame: toFrame(e.frame as Record<string, unknown>),
  bytes: hexToBytes(e.hex),
}));
