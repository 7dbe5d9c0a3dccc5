/**
 * Test-only EDF byte builder, written from the field table of REFERENCES.md §7 (Kemp et al.
 * 1992; Kemp & Olivan 2003) and independent of shared/formats: every field is given as raw
 * text, so tests can put wrong values in any of them.
 */

export interface BuildSignal {
  label: string;
  transducer?: string;
  dimension?: string;
  pmin?: string;
  pmax?: string;
  dmin?: string;
  dmax?: string;
  prefilter?: string;
  n: string;
  reserved?: string;
}

export interface BuildHeader {
  version?: string;
  /** true: version field 0xFF 'BIOSEMI' */
  bdf?: boolean;
  patient?: string;
  recording?: string;
  startDate?: string;
  startTime?: string;
  headerBytes?: string;
  reserved?: string;
  records?: string;
  duration?: string;
  ns?: string;
  signals: BuildSignal[];
}

/** Left-justified, space-padded; longer text is kept whole (to make wrong widths). */
export function field(text: string, width: number): Uint8Array {
  const out = new Uint8Array(Math.max(width, text.length)).fill(32);
  for (let i = 0; i < text.length; i++) out[i] = text.charCodeAt(i) & 0xff;
  return out;
}

export function concat(...parts: Uint8Array[]): Uint8Array {
  let n = 0;
  for (const p of parts) n += p.length;
  const out = new Uint8Array(n);
  let o = 0;
  for (const p of parts) { out.set(p, o); o += p.length; }
  return out;
}

export function header(h: BuildHeader): Uint8Array {
  const ns = h.signals.length;
  const fixed = concat(
    h.bdf ? concat(Uint8Array.of(0xff), field('BIOSEMI', 7)) : field(h.version ?? '0', 8),
    field(h.patient ?? 'X X X X', 80),
    field(h.recording ?? 'Startdate 01-JAN-2024 X X X', 80),
    field(h.startDate ?? '01.01.24', 8),
    field(h.startTime ?? '10.00.00', 8),
    field(h.headerBytes ?? String(256 * (ns + 1)), 8),
    field(h.reserved ?? 'EDF+C', 44),
    field(h.records ?? '1', 8),
    field(h.duration ?? '1', 8),
    field(h.ns ?? String(ns), 4),
  );
  const cols: [keyof BuildSignal, number, string][] = [
    ['label', 16, ''], ['transducer', 80, ''], ['dimension', 8, 'uV'], ['pmin', 8, '-3276.8'], ['pmax', 8, '3276.7'],
    ['dmin', 8, '-32768'], ['dmax', 8, '32767'], ['prefilter', 80, ''], ['n', 8, ''], ['reserved', 32, ''],
  ];
  const perSignal = cols.flatMap(([key, width, dflt]) => h.signals.map((s) => field(s[key] ?? dflt, width)));
  return concat(fixed, ...perSignal);
}

export function int16le(values: number[]): Uint8Array {
  const out = new Uint8Array(2 * values.length);
  const view = new DataView(out.buffer);
  values.forEach((v, i) => view.setInt16(2 * i, v, true));
  return out;
}

/** TAL bytes from text with 0x14/0x15/0x00 written as \x14 etc., padded with 0x00 to `bytes`. */
export function slot(text: string, bytes: number): Uint8Array {
  const enc = new TextEncoder().encode(text);
  if (enc.length > bytes) throw new Error(`slot of ${bytes} bytes cannot hold ${enc.length}`);
  const out = new Uint8Array(bytes);
  out.set(enc);
  return out;
}

export const ANNOTATIONS: BuildSignal = { label: 'EDF Annotations', dimension: '', pmin: '-1', pmax: '1', n: '15' };

/**
 * A valid EDF+ file: 'Cz' (4 samples per 1-s record, 0.1 uV per bit) + 'EDF Annotations'
 * (15 samples = 30 bytes). `tals[r]` is record r's annotation text; default '+r' time keeping.
 */
export function smallEdf(opts: { records?: number; reserved?: string; tals?: string[]; samples?: number[][] } = {}): Uint8Array {
  const records = opts.records ?? 2;
  const parts = [header({ reserved: opts.reserved, records: String(records), signals: [{ label: 'Cz', n: '4' }, ANNOTATIONS] })];
  for (let r = 0; r < records; r++) {
    parts.push(int16le(opts.samples?.[r] ?? [r, -r, 1000 * r, -1000]));
    parts.push(slot(opts.tals?.[r] ?? `+${r}\x14\x14\x00`, 30));
  }
  return concat(...parts);
}

/** Copy of `bytes` with `text` written at `offset`. */
export function patch(bytes: Uint8Array, offset: number, text: string | Uint8Array): Uint8Array {
  const out = bytes.slice();
  out.set(typeof text === 'string' ? field(text, text.length) : text, offset);
  return out;
}

/** Per-signal field offsets for ns signals (REFERENCES.md §7): 256 + ns * (widths before) + i * width. */
export function signalFieldOffset(ns: number, name: keyof BuildSignal, i: number): number {
  const order: [keyof BuildSignal, number][] = [['label', 16], ['transducer', 80], ['dimension', 8], ['pmin', 8],
    ['pmax', 8], ['dmin', 8], ['dmax', 8], ['prefilter', 80], ['n', 8], ['reserved', 32]];
  let before = 0;
  for (const [key, width] of order) {
    if (key === name) return 256 + ns * before + i * width;
    before += width;
  }
  throw new Error(name);
}

/**
 * Invented recording for the written-file fixtures (make_written_edf.ts, read_written_edf.py):
 * 3 channels at 200 Hz, 450 samples (2.25 s, so the last 1-s record is padded), sines in uV,
 * a sub-second start and one non-ASCII annotation text.
 */
export function writtenRecording(): {
  channelNames: string[]; sampleRateHz: number; data: Float64Array[];
  annotations: { onsetS: number; durationS: number | null; text: string }[]; startTime: string;
} {
  return {
    channelNames: ['C3', 'Cz', 'C4'],
    sampleRateHz: 200,
    data: [0, 1, 2].map((c) => Float64Array.from({ length: 450 }, (_, i) => 50 * Math.sin(2 * Math.PI * (5 + c) * i / 200) + 10 * c - 3.3)),
    annotations: [{ onsetS: 0.5, durationS: 1, text: 'left' }, { onsetS: 1.25, durationS: null, text: 'right' },
      { onsetS: 2, durationS: 0.25, text: 'Ünïcode cue' }],
    startTime: '2023-11-05T14:03:27.5',
  };
}
