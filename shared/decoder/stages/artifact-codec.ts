/**
 * JSON-safe encodings used in stage artifacts (re-exported by shared/decoder/pipeline.ts):
 * float64 arrays as base64 of their IEEE 754 bytes, row-major matrices, and small parsers that
 * narrow `unknown` JSON with errors naming the field.
 */
import { ShapeError } from '../../types';

/** Narrows `unknown` to a plain object or throws a ShapeError naming the field. */
export function asRecord(v: unknown, field: string): Record<string, unknown> {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) {
    throw new ShapeError(field, `expected an object, got ${Array.isArray(v) ? 'an array' : typeof v}`);
  }
  return v as Record<string, unknown>;
}

/** Reads a finite number field or throws a ShapeError naming it. */
export function numberField(rec: Record<string, unknown>, key: string, field: string): number {
  const v = rec[key];
  if (typeof v !== 'number' || !Number.isFinite(v)) {
    throw new ShapeError(`${field}.${key}`, `expected a finite number, got ${String(v)}`);
  }
  return v;
}

const B64 = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
const B64_INDEX = new Int16Array(128).fill(-1);
for (let i = 0; i < 64; i++) B64_INDEX[B64.charCodeAt(i)] = i;

/**
 * Encodes float64 values as base64 (RFC 4648, with padding) of their little-endian IEEE 754
 * bytes: exact (NaN and ±Infinity survive, unlike JSON numbers) and about 11 characters per value.
 */
export function encodeF64(values: ArrayLike<number>): string {
  const bytes = new Uint8Array(values.length * 8);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < values.length; i++) view.setFloat64(i * 8, values[i]!, true);
  let out = '';
  for (let i = 0; i < bytes.length; i += 3) {
    const b0 = bytes[i]!, b1 = bytes[i + 1] ?? 0, b2 = bytes[i + 2] ?? 0;
    out += B64[b0 >> 2]! + B64[((b0 & 3) << 4) | (b1 >> 4)]!
      + (i + 1 < bytes.length ? B64[((b1 & 15) << 2) | (b2 >> 6)]! : '=')
      + (i + 2 < bytes.length ? B64[b2 & 63]! : '=');
  }
  return out;
}

/**
 * Decodes what `encodeF64` wrote; also accepts a plain JSON number array.
 * @param field name used in the ShapeError when the value is malformed
 */
export function decodeF64(v: unknown, field = 'value'): Float64Array {
  if (Array.isArray(v)) {
    return Float64Array.from(v, (x: unknown, i) => {
      if (typeof x !== 'number') throw new ShapeError(`${field}[${i}]`, `expected a number, got ${typeof x}`);
      return x;
    });
  }
  if (typeof v !== 'string') throw new ShapeError(field, `expected a base64 string or number array, got ${typeof v}`);
  const s = v.replace(/=+$/, '');
  const nBytes = Math.floor((s.length * 6) / 8);
  if (nBytes % 8 !== 0 || s.length % 4 === 1) {
    throw new ShapeError(field, `expected base64 of a whole number of float64 values, got ${v.length} characters`);
  }
  const bytes = new Uint8Array(nBytes);
  let acc = 0, bits = 0, o = 0;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    const d = c < 128 ? B64_INDEX[c]! : -1;
    if (d < 0) throw new ShapeError(field, `invalid base64 character at ${i}`);
    acc = (acc << 6) | d;
    bits += 6;
    if (bits >= 8) { bits -= 8; bytes[o++] = (acc >> bits) & 255; }
  }
  const view = new DataView(bytes.buffer);
  const out = new Float64Array(nBytes / 8);
  for (let i = 0; i < out.length; i++) out[i] = view.getFloat64(i * 8, true);
  return out;
}

/** A row-major matrix in an artifact. */
export type EncodedRows = { rows: number; cols: number; f64: string };

/** Encodes equal-length rows (e.g. spatial filters) as one base64 block. */
export function encodeRows(rows: readonly Float64Array[]): EncodedRows {
  const cols = rows[0]?.length ?? 0;
  const flat = new Float64Array(rows.length * cols);
  rows.forEach((r, i) => {
    if (r.length !== cols) throw new ShapeError(`rows[${i}]`, `expected length ${cols}, got ${r.length}`);
    flat.set(r, i * cols);
  });
  return { rows: rows.length, cols, f64: encodeF64(flat) };
}

/** Decodes what `encodeRows` wrote. */
export function decodeRows(v: unknown, field: string): Float64Array[] {
  const rec = asRecord(v, field);
  const rows = numberField(rec, 'rows', field), cols = numberField(rec, 'cols', field);
  const flat = decodeF64(rec.f64, `${field}.f64`);
  if (flat.length !== rows * cols) throw new ShapeError(field, `expected ${rows}x${cols} values, got ${flat.length}`);
  return Array.from({ length: rows }, (_, i) => flat.slice(i * cols, (i + 1) * cols));
}
