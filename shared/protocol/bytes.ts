/**
 * Bounds-checked little-endian reading and writing for the feed protocol. The reader checks every
 * length against the bytes actually present and against a limit before it allocates.
 */
import { FeedProtocolError, MAX_SAMPLE_INDEX } from './frames';

const HOST_LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
const utf8Decoder = new TextDecoder('utf-8', { fatal: true });
const utf8Encoder = new TextEncoder();
// C0 controls and DEL: never valid inside names, ids, labels or reasons.
const CONTROL = /[\u0000-\u001f\u007f]/;

/** Reads a frame payload; every read names the field it serves, for the error it may throw. */
export class ByteReader {
  private readonly view: DataView;
  offset = 0;

  constructor(readonly bytes: Uint8Array) {
    this.view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  }

  get remaining(): number {
    return this.bytes.byteLength - this.offset;
  }

  need(n: number, field: string): void {
    if (this.remaining < n) {
      throw new FeedProtocolError('truncated', field, `needs ${n} more byte(s), ${this.remaining} left`);
    }
  }

  u8(field: string): number {
    this.need(1, field);
    return this.view.getUint8(this.offset++);
  }

  u16(field: string): number {
    this.need(2, field);
    const v = this.view.getUint16(this.offset, true);
    this.offset += 2;
    return v;
  }

  u32(field: string): number {
    this.need(4, field);
    const v = this.view.getUint32(this.offset, true);
    this.offset += 4;
    return v;
  }

  /** u64 stored as low u32 then high u32; refused above 2^53 - 1 so it stays exact as a number. */
  u64(field: string): number {
    this.need(8, field);
    const lo = this.view.getUint32(this.offset, true);
    const hi = this.view.getUint32(this.offset + 4, true);
    this.offset += 8;
    if (hi > 0x1f_ffff) throw new FeedProtocolError('limit-exceeded', field, `exceeds ${MAX_SAMPLE_INDEX}`);
    return hi * 0x1_0000_0000 + lo;
  }

  f64(field: string): number {
    this.need(8, field);
    const v = this.view.getFloat64(this.offset, true);
    this.offset += 8;
    return v;
  }

  /** u8 length then UTF-8 bytes; refused when longer than `maxBytes`, malformed, or containing controls. */
  str8(field: string, maxBytes: number): string {
    const n = this.u8(`${field}.length`);
    if (n > maxBytes) throw new FeedProtocolError('limit-exceeded', field, `${n} bytes exceeds ${maxBytes}`);
    this.need(n, field);
    let s: string;
    try {
      s = utf8Decoder.decode(this.bytes.subarray(this.offset, this.offset + n));
    } catch {
      throw new FeedProtocolError('bad-utf8', field, 'is not valid UTF-8');
    }
    this.offset += n;
    if (CONTROL.test(s)) throw new FeedProtocolError('invalid-value', field, 'contains a control character');
    return s;
  }

  /** `count` float32 values, copied into a new array (the input may be unaligned or pooled). */
  f32Array(count: number, field: string): Float32Array {
    this.need(count * 4, field);
    const out = new Float32Array(count);
    const src = this.bytes.subarray(this.offset, this.offset + count * 4);
    if (HOST_LITTLE_ENDIAN) {
      new Uint8Array(out.buffer).set(src);
    } else {
      for (let i = 0; i < count; i++) out[i] = this.view.getFloat32(this.offset + 4 * i, true);
    }
    this.offset += count * 4;
    return out;
  }
}

/** Writes into a buffer of exactly known size (every frame's size is known before encoding). */
export class ByteWriter {
  readonly bytes: Uint8Array;
  private readonly view: DataView;
  offset = 0;

  constructor(size: number) {
    this.bytes = new Uint8Array(size);
    this.view = new DataView(this.bytes.buffer);
  }

  u8(v: number): void { this.view.setUint8(this.offset, v); this.offset += 1; }
  u16(v: number): void { this.view.setUint16(this.offset, v, true); this.offset += 2; }
  u32(v: number): void { this.view.setUint32(this.offset, v, true); this.offset += 4; }
  f64(v: number): void { this.view.setFloat64(this.offset, v, true); this.offset += 8; }

  u64(v: number): void {
    this.u32(v % 0x1_0000_0000);
    this.u32(Math.floor(v / 0x1_0000_0000));
  }

  str8(encoded: Uint8Array): void {
    this.u8(encoded.byteLength);
    this.bytes.set(encoded, this.offset);
    this.offset += encoded.byteLength;
  }

  f32Array(values: Float32Array): void {
    if (HOST_LITTLE_ENDIAN && this.offset % 4 === 0) {
      new Float32Array(this.bytes.buffer, this.offset, values.length).set(values);
    } else {
      for (let i = 0; i < values.length; i++) this.view.setFloat32(this.offset + 4 * i, values[i]!, true);
    }
    this.offset += values.length * 4;
  }
}

/** UTF-8 bytes of `s`, refused (as the encoder's caller error) when too long or holding controls. */
export function utf8(s: string, field: string, maxBytes: number): Uint8Array {
  const b = utf8Encoder.encode(s);
  if (b.byteLength > maxBytes) throw new FeedProtocolError('limit-exceeded', field, `${b.byteLength} bytes exceeds ${maxBytes}`);
  if (CONTROL.test(s)) throw new FeedProtocolError('invalid-value', field, 'contains a control character');
  return b;
}
