import { describe, expect, it } from 'vitest';
import { EdfFormatError, readEdf, readEdfHeader } from '../../../shared/formats/edf';
import {
  ANNOTATIONS, concat, header, int16le, patch, signalFieldOffset, slot, smallEdf,
} from './edf-builder';

/** The EdfFormatError thrown by fn (fails the test if it throws anything else or nothing). */
function refusal(fn: () => unknown): EdfFormatError {
  try { fn(); } catch (e) {
    if (e instanceof EdfFormatError) return e;
    throw new Error(`expected EdfFormatError, got ${String(e)}`);
  }
  throw new Error('expected EdfFormatError, nothing was thrown');
}
const fieldOf = (bytes: Uint8Array, opts?: { maxBytes?: number }) => refusal(() => readEdf(bytes, opts)).field;

// Offsets of the fixed header (REFERENCES.md §7 table) and of the small file's per-signal fields (ns = 2).
const at = { patientId: 8, startDate: 168, startTime: 176, headerBytes: 184, reserved: 192, records: 236, duration: 244, ns: 252 };
const sig = (name: Parameters<typeof signalFieldOffset>[1], i = 0) => signalFieldOffset(2, name, i);

describe('EDF reader on malformed files', () => {
  it('reads the untouched small file (the baseline every case below breaks)', () => {
    // Reference: edf-builder.ts smallEdf, valid by REFERENCES.md §7.
    expect(readEdf(smallEdf()).format).toBe('EDF+C');
  });

  it('refuses truncated files: inside the fixed header, the signal header, and the data', () => {
    const ok = smallEdf();
    // Reference: REFERENCES.md §7 (256-byte fixed header, 256 * (ns + 1) header bytes, size rule).
    expect(fieldOf(ok.subarray(0, 100))).toBe('header');
    expect(fieldOf(ok.subarray(0, 600))).toBe('header');
    const e = refusal(() => readEdf(ok.subarray(0, ok.length - 1)));
    expect([e.field, /truncated/.test(e.message)]).toEqual(['fileSize', true]);
  });

  it('refuses a file whose length differs from header + records x record bytes', () => {
    // Reference: REFERENCES.md §7 integrity rule (size = 256 (ns + 1) + records * record bytes).
    expect(fieldOf(concat(smallEdf(), Uint8Array.of(0)))).toBe('fileSize');
    expect(fieldOf(patch(smallEdf(), at.records, '3       '))).toBe('fileSize');
  });

  it('refuses records = -1 in EDF+ and infers the count in plain EDF', () => {
    // Reference: Kemp & Olivan 2003 (EDF+: -1 only while recording); REFERENCES.md §7.
    expect(fieldOf(patch(smallEdf(), at.records, '-1      '))).toBe('records');
    const plain = patch(patch(smallEdf({ reserved: '' }), at.records, '-1      '), at.reserved, ' '.repeat(44));
    expect(readEdf(plain).records).toBe(2);
    expect(fieldOf(patch(smallEdf(), at.records, '-2      '))).toBe('records');
  });

  it('refuses fields written at the wrong width (everything after them shifts)', () => {
    const ok = smallEdf();
    // Reference: REFERENCES.md §7 fixed offsets: a 9-byte version field moves the start date by one byte.
    expect(fieldOf(concat(ok.subarray(0, 8), Uint8Array.of(32), ok.subarray(8, ok.length - 1)))).toBe('startDate');
    // A 9-byte records field ('22' + ...) moves the duration and ns fields; the size no longer adds up.
    expect(fieldOf(concat(ok.subarray(0, at.records), Uint8Array.of(0x32), ok.subarray(at.records)))).toBe('fileSize');
    // A 3-byte ns field pulls the first label's 'C' into it: ns is no longer a number.
    expect(fieldOf(concat(ok.subarray(0, 255), ok.subarray(256)))).toBe('signalCount');
  });

  it('refuses non-numeric and malformed numeric fields', () => {
    const ok = smallEdf();
    // Reference: REFERENCES.md §7 (numeric ASCII fields, decimal separator '.').
    expect(fieldOf(patch(ok, at.records, 'two     '))).toBe('records');
    expect(fieldOf(patch(ok, at.duration, '1,0     '))).toBe('recordDurationS');
    expect(refusal(() => readEdf(patch(ok, sig('pmin'), '-3276,8 '))).message).toMatch(/separator must be '.'/);
    expect(fieldOf(patch(ok, sig('pmin'), '-3276,8 '))).toBe('signals[0].physicalMin');
    expect(fieldOf(patch(ok, sig('n'), '4x      '))).toBe('signals[0].samplesPerRecord');
    expect(fieldOf(patch(ok, sig('dmax'), '3.5e4   '))).toBe('signals[0].digitalMax');
    expect(fieldOf(patch(ok, at.headerBytes, '700     '))).toBe('headerBytes');
    expect(fieldOf(patch(ok, 0, '1       '))).toBe('version');
    expect(fieldOf(patch(ok, at.startDate, '1.1.2024'))).toBe('startDate');
    expect(fieldOf(patch(ok, at.startDate, '31.02.24'))).toBe('startDate');
    expect(fieldOf(patch(ok, at.startTime, '25.00.00'))).toBe('startTime');
  });

  it('refuses non-ASCII bytes in the header, naming the field', () => {
    // Reference: Kemp & Olivan 2003: header bytes are ASCII 32-126 only.
    expect(fieldOf(patch(smallEdf(), at.patientId, Uint8Array.of(0xc3, 0xa9)))).toBe('patientId');
    expect(fieldOf(patch(smallEdf(), sig('label', 1) + 3, Uint8Array.of(0)))).toBe('signals[1].label');
    expect(fieldOf(patch(smallEdf(), sig('prefilter'), Uint8Array.of(0x09)))).toBe('signals[0].prefiltering');
  });

  it('refuses absurd counts: no signals, too many signals, zero samples per record, zero duration', () => {
    // Our documented limits (shared/formats/edf-types.ts): 1 <= ns <= 4096, samplesPerRecord >= 1.
    expect(fieldOf(patch(smallEdf(), at.ns, '0   '))).toBe('signalCount');
    expect(fieldOf(patch(smallEdf(), at.ns, '5000'))).toBe('signalCount');
    expect(fieldOf(patch(smallEdf(), sig('n'), '0       '))).toBe('signals[0].samplesPerRecord');
    // Reference: Kemp & Olivan 2003: duration 0 only without ordinary signals.
    expect(fieldOf(patch(smallEdf(), at.duration, '0       '))).toBe('recordDurationS');
    expect(fieldOf(patch(smallEdf(), at.duration, '-1      '))).toBe('recordDurationS');
  });

  it('refuses a header that claims gigabytes, before allocating anything', () => {
    // 99,999,999 records of 38 bytes = 3.8 GB claimed by a 844-byte file: refused by the size checks.
    const e = refusal(() => readEdf(patch(smallEdf(), at.records, '99999999')));
    expect([e.field, /limit/.test(e.message)]).toEqual(['records', true]);
    // 99,999,999 samples per record: 200 MB per record, within the default limit but not the file's length.
    expect(fieldOf(patch(smallEdf(), sig('n'), '99999999'))).toBe('fileSize');
    expect(fieldOf(patch(smallEdf(), sig('n'), '99999999'), { maxBytes: 1e6 })).toBe('records');
    // Our option: maxBytes caps the file itself.
    expect(fieldOf(smallEdf(), { maxBytes: 500 })).toBe('maxBytes');
  });

  it('refuses dmax <= dmin, pmax == pmin and digital limits outside 16 bits', () => {
    // Reference: Kemp & Olivan 2003 (dmax > dmin, pmax != pmin); EDF samples are int16 (Kemp et al. 1992).
    expect(fieldOf(patch(smallEdf(), sig('dmax'), '-32768  '))).toBe('signals[0].digitalMax');
    expect(fieldOf(patch(smallEdf(), sig('pmax'), '-3276.8 '))).toBe('signals[0].physicalMax');
    expect(fieldOf(patch(smallEdf(), sig('dmin'), '-40000  '))).toBe('signals[0].digitalMin');
    // Reference: Kemp & Olivan 2003: pmax < pmin is allowed (negative gain).
    const inverted = readEdf(patch(patch(smallEdf(), sig('pmin'), '3276.7  '), sig('pmax'), '-3276.8 '));
    // Digital 1000 (record 1, sample 2): (1000 + 32768) * -0.1 + 3276.7 = -100.1.
    expect(inverted.data[0]![6]).toBeCloseTo(-100.1, 9);
  });

  it('refuses malformed TALs and EDF+D files without usable record times', () => {
    // Reference: Kemp & Olivan 2003 §2.2.2 (TAL syntax) and §2.2.4 (time keeping, EDF+D order).
    expect(fieldOf(smallEdf({ tals: ['+0\x14\x14\x00', '+1\x00'] }))).toBe('annotations');
    expect(fieldOf(smallEdf({ tals: ['0\x14\x14\x00', '+1\x14\x14\x00'] }))).toBe('annotations');
    expect(fieldOf(smallEdf({ tals: ['+0\x14\x14\x00+1\x15-2\x14x\x14\x00', '+1\x14\x14\x00'] }))).toBe('annotations');
    expect(fieldOf(smallEdf({ reserved: 'EDF+D', tals: ['+0\x14\x14\x00', '+2\x14T1\x14\x00'] }))).toBe('annotations');
    expect(fieldOf(smallEdf({ reserved: 'EDF+D', tals: ['+5\x14\x14\x00', '+4.5\x14\x14\x00'] }))).toBe('annotations');
    const noAnnotationSignal = concat(header({ reserved: 'EDF+D', signals: [{ label: 'Cz', n: '4' }] }), int16le([1, 2, 3, 4]));
    expect(fieldOf(noAnnotationSignal)).toBe('annotations');
  });

  it('never throws anything but EdfFormatError on truncations and random byte damage', () => {
    const ok = concat(header({ signals: [{ label: 'Cz', n: '4' }, ANNOTATIONS] }), int16le([1, 2, 3, 4]),
      slot('+0\x14\x14\x00+0.5\x152\x14T1\x14\x00', 30));
    // Common practice (robust parsing): every prefix, and 2000 seeded random corruptions.
    for (let n = 0; n < ok.length; n++) refusal(() => readEdf(ok.subarray(0, n)));
    let seed = 7;
    const rnd = () => { seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0; return seed / 2 ** 32; };
    for (let trial = 0; trial < 2000; trial++) {
      const bad = ok.slice();
      for (let k = 0; k < 1 + Math.floor(rnd() * 4); k++) bad[Math.floor(rnd() * bad.length)] = Math.floor(rnd() * 256);
      try { readEdf(bad); readEdfHeader(bad); } catch (e) {
        if (!(e instanceof EdfFormatError)) throw new Error(`trial ${trial}: ${String(e)}`);
      }
    }
  });
});
