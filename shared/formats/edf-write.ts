/**
 * EDF+C / BDF+C writer (Kemp et al. 1992; Kemp & Olivan 2003): one ordinary signal per channel,
 * then one annotation signal holding each record's time-keeping TAL and the recording's
 * annotations (cue annotations: text = class label).
 */
import { ParamError, ShapeError, type Recording } from '../types';
import { asciiField, formatDecimalField, formatTalSeconds, isCalendarDate, MONTHS } from './edf-fields';
import { encodeTal } from './edf-tal';
import { BDF_DIGITAL_RANGE, EDF_DIGITAL_RANGE, MAX_SIGNALS } from './edf-types';

/** Options of writeEdfPlus. */
export interface WriteEdfPlusOptions {
  /** 'EDF+C' (16-bit, default) or 'BDF+C' (24-bit). */
  format?: 'EDF+C' | 'BDF+C';
  /** Pseudonymous participant code (spaces become '_'); never a name. Default 'X' (unknown). */
  patientCode?: string;
  /** Admin code of the recording id (e.g. the study's code). Default 'X'. */
  recordingCode?: string;
  /** Data record duration; default the smallest whole number of seconds holding whole samples (1 s for integer rates). */
  recordDurationS?: number;
  /** Physical dimension of every channel; default 'uV'. */
  physicalDimension?: string;
  /** One physical range for every channel; values outside it saturate. Default: each channel's own min..max. */
  physicalRange?: [number, number];
}

const PAD = 32;

/**
 * Writes a Recording as EDF+C (16-bit) or BDF+C (24-bit).
 * - Patient id 'code X X X' (EDF+ subfields code, sex, birthdate, name: only the pseudonymous
 *   code is ever written). Recording id 'Startdate dd-MMM-yyyy code X X' ('Startdate X' and
 *   header date 01.01.85 when startTime is null). A sub-second start goes into the time-keeping
 *   TALs ('+0.5'), as EDF+ prescribes; the local date-time fields of startTime are used as is.
 * - Scaling: digital range full (-32768..32767 or -8388608..8388607); physical min/max are
 *   rounded outward to fit their 8 characters and the gain is computed from the written text,
 *   so reading back differs from the input by at most half a digital step (gain / 2).
 * - The last record is padded by repeating the last sample; reading back yields
 *   ceil(n / samplesPerRecord) * samplesPerRecord samples.
 * - Annotation slots are sized for the fullest record; an annotation sits in the record its
 *   onset falls in (onsets before 0 in the first, after the end in the last).
 * @throws ShapeError for mismatched or empty data or non-finite samples; ParamError for bad
 *   options, labels that do not fit 16 ASCII characters, or a start before 1985
 */
export function writeEdfPlus(rec: Recording, opts: WriteEdfPlusOptions = {}): Uint8Array {
  const isBdf = (opts.format ?? 'EDF+C') === 'BDF+C';
  const bps = isBdf ? 3 : 2;
  const [dmin, dmax] = isBdf ? BDF_DIGITAL_RANGE : EDF_DIGITAL_RANGE;
  const nSamples = checkShape(rec);
  const durationS = chooseDuration(rec.sampleRateHz, opts.recordDurationS);
  const spr = Math.round(rec.sampleRateHz * durationS);
  const records = Math.ceil(nSamples / spr);
  const ranges = rec.data.map((x, c) => physicalRange(x, opts.physicalRange, rec.channelNames[c]!));
  const start = parseStart(rec.startTime);
  const slots = annotationSlots(rec, records, durationS, start.fracS);
  let slotBytes = 0;
  for (const s of slots) slotBytes = Math.max(slotBytes, s.length);
  const slotSamples = Math.ceil(slotBytes / bps);

  const ns = rec.data.length + 1;
  const headerBytes = 256 * (ns + 1);
  const recordBytes = bps * (spr * rec.data.length + slotSamples);
  const out = new Uint8Array(headerBytes + records * recordBytes);
  let o = 0;
  const put = (text: string, width: number, field: string) => { out.set(asciiField(text, width, field), o); o += width; };
  if (isBdf) { out[0] = 0xff; o = 1; put('BIOSEMI', 7, 'version'); } else put('0', 8, 'version');
  put(`${printable(opts.patientCode ?? 'X', 'patientCode', 74)} X X X`, 80, 'patientCode');
  put(`Startdate ${start.recordingDate} ${printable(opts.recordingCode ?? 'X', 'recordingCode', 54)} X X`, 80, 'recordingCode');
  put(start.dateField, 8, 'startTime');
  put(start.timeField, 8, 'startTime');
  put(String(headerBytes), 8, 'headerBytes');
  put(isBdf ? 'BDF+C' : 'EDF+C', 44, 'format');
  put(String(records), 8, 'records');
  put(formatTalSeconds(durationS), 8, 'recordDurationS');
  put(String(ns), 4, 'channelNames');

  const dimension = printable(opts.physicalDimension ?? 'uV', 'physicalDimension', 8, false);
  const labels = rec.channelNames.map((name) => {
    const label = printable(name, 'channelNames', 16, false);
    if (label.trim() === 'EDF Annotations' || label.trim() === 'BDF Annotations') {
      throw new ParamError('channelNames', `'${label}' is reserved for the annotation signal`);
    }
    return label;
  });
  const annLabel = isBdf ? 'BDF Annotations' : 'EDF Annotations';
  const perSignal: [number, (c: number) => string][] = [
    [16, (c) => labels[c] ?? annLabel],
    [80, () => ''],
    [8, (c) => (c < rec.data.length ? dimension : '')],
    [8, (c) => (c < rec.data.length ? ranges[c]!.minText : '-1')],
    [8, (c) => (c < rec.data.length ? ranges[c]!.maxText : '1')],
    [8, () => String(dmin)],
    [8, () => String(dmax)],
    [80, () => ''],
    [8, (c) => String(c < rec.data.length ? spr : slotSamples)],
    [32, () => ''],
  ];
  for (const [width, value] of perSignal) for (let c = 0; c < ns; c++) put(value(c), width, 'channelNames');

  const view = new DataView(out.buffer);
  for (let r = 0; r < records; r++) {
    let p = headerBytes + r * recordBytes;
    rec.data.forEach((x, c) => {
      const { min: pmin, max: pmax } = ranges[c]!;
      const scale = (dmax - dmin) / (pmax - pmin);
      for (let j = 0; j < spr; j++, p += bps) {
        const v = x[Math.min(r * spr + j, nSamples - 1)]!;
        const d = Math.min(dmax, Math.max(dmin, Math.round((v - pmin) * scale + dmin)));
        if (bps === 2) view.setInt16(p, d, true);
        else { out[p] = d & 0xff; out[p + 1] = (d >> 8) & 0xff; out[p + 2] = (d >> 16) & 0xff; }
      }
    });
    out.set(slots[r]!, p); // the rest of the slot stays 0x00
  }
  return out;
}

function checkShape(rec: Recording): number {
  if (rec.data.length === 0) throw new ShapeError('data', 'expected at least one channel, got 0');
  if (rec.data.length + 1 > MAX_SIGNALS) {
    throw new ShapeError('data', `expected at most ${MAX_SIGNALS - 1} channels (plus the annotation signal), got ${rec.data.length}`);
  }
  if (rec.channelNames.length !== rec.data.length) {
    throw new ShapeError('channelNames', `expected ${rec.data.length} names (one per channel), got ${rec.channelNames.length}`);
  }
  if (!(rec.sampleRateHz > 0) || !Number.isFinite(rec.sampleRateHz)) {
    throw new ParamError('sampleRateHz', `must be a positive finite number, got ${rec.sampleRateHz}`);
  }
  const n = rec.data[0]!.length;
  if (n === 0) throw new ShapeError('data', 'expected at least one sample, got 0');
  rec.data.forEach((x, c) => {
    if (x.length !== n) throw new ShapeError('data', `expected [${rec.data.length}][${n}], channel ${c} has ${x.length} samples`);
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(x[i]!)) {
        throw new ShapeError('data', `channel '${rec.channelNames[c]}' sample ${i} is ${x[i]}; EDF cannot store non-finite values`);
      }
    }
  });
  return n;
}

/** Record duration whose sample count is whole and whose text fits 8 characters. */
function chooseDuration(rateHz: number, given: number | undefined): number {
  const whole = (d: number) => Math.abs(rateHz * d - Math.round(rateHz * d)) <= 1e-9 * rateHz * d && Math.round(rateHz * d) >= 1;
  if (given !== undefined) {
    if (!(given > 0) || !Number.isFinite(given) || formatTalSeconds(given).length > 8) {
      throw new ParamError('recordDurationS', `must be a positive number written in at most 8 characters, got ${given}`);
    }
    if (!whole(given)) throw new ParamError('recordDurationS', `${given} s at ${rateHz} Hz is not a whole number of samples`);
    return given;
  }
  for (let d = 1; d <= 100; d++) if (whole(d)) return d;
  throw new ParamError('recordDurationS', `no whole-second record up to 100 s holds whole samples at ${rateHz} Hz; give recordDurationS`);
}

interface PhysicalRange { min: number; max: number; minText: string; maxText: string }

/** Physical min/max as 8-character texts (rounded outward) and their parsed values. */
function physicalRange(x: Float64Array, given: [number, number] | undefined, name: string): PhysicalRange {
  let lo: number;
  let hi: number;
  if (given) {
    [lo, hi] = given;
    if (!Number.isFinite(lo) || !Number.isFinite(hi) || !(hi > lo)) {
      throw new ParamError('physicalRange', `expected finite [min, max] with max > min, got [${lo}, ${hi}]`);
    }
  } else {
    lo = Infinity; hi = -Infinity;
    for (let i = 0; i < x.length; i++) { const v = x[i]!; if (v < lo) lo = v; if (v > hi) hi = v; }
    // A flat channel still needs pmax != pmin (EDF+); widen by one unit each way.
    if (hi === lo) { lo -= 1; hi += 1; }
  }
  const minText = formatDecimalField(lo, 8, 'down');
  const maxText = formatDecimalField(hi, 8, 'up');
  if (minText === null || maxText === null) {
    throw new ParamError('physicalRange', `channel '${name}' range [${lo}, ${hi}] does not fit 8 characters`);
  }
  return { min: Number(minText), max: Number(maxText), minText, maxText };
}

/** Header date/time fields, recording-id date and the sub-second part of the start. */
function parseStart(iso: string | null): { dateField: string; timeField: string; recordingDate: string; fracS: number } {
  if (iso === null) return { dateField: '01.01.85', timeField: '00.00.00', recordingDate: 'X', fracS: 0 };
  const m = /^(\d{4})-(\d\d)-(\d\d)T(\d\d):(\d\d):(\d\d)(\.\d+)?(Z|[+-]\d\d:?\d\d)?$/.exec(iso);
  if (!m) throw new ParamError('startTime', `expected ISO 8601 'YYYY-MM-DDTHH:MM:SS', got '${iso}'`);
  const [year, month, day] = [Number(m[1]), Number(m[2]), Number(m[3])];
  if (year < 1985) throw new ParamError('startTime', `EDF cannot store a start before 1985, got ${year}`);
  const monthName = MONTHS[month - 1];
  if (!monthName || !isCalendarDate(year, month, day) || Number(m[4]) > 23 || Number(m[5]) > 59 || Number(m[6]) > 59) {
    throw new ParamError('startTime', `not a valid date-time: '${iso}'`);
  }
  const yy = year > 2084 ? 'yy' : String(year % 100).padStart(2, '0');
  return {
    dateField: `${m[3]}.${m[2]}.${yy}`,
    timeField: `${m[4]}.${m[5]}.${m[6]}`,
    recordingDate: `${String(day).padStart(2, '0')}-${monthName}-${m[1]}`,
    fracS: m[7] ? Number(`0${m[7]}`) : 0,
  };
}

/** Nanosecond rounding keeps '+0.30000000000000004'-style noise out of TAL onsets. */
const ns9 = (x: number) => Math.round(x * 1e9) / 1e9;

/** TAL bytes of every record: its time-keeping TAL, then the annotations whose onset falls in it. */
function annotationSlots(rec: Recording, records: number, durationS: number, fracS: number): Uint8Array[] {
  const perRecord: Uint8Array[][] = Array.from({ length: records }, (_, r) => [encodeTal(ns9(fracS + r * durationS), null, [])]);
  for (const a of rec.annotations) {
    if (!Number.isFinite(a.onsetS)) throw new ParamError('annotations', `onset must be finite, got ${a.onsetS}`);
    const r = Math.min(records - 1, Math.max(0, Math.floor(a.onsetS / durationS)));
    const onset = fracS === 0 ? a.onsetS : ns9(a.onsetS + fracS);
    perRecord[r]!.push(encodeTal(onset, a.durationS, [a.text]));
  }
  return perRecord.map((tals) => {
    let n = 0;
    for (const t of tals) n += t.length;
    const slot = new Uint8Array(n);
    let o = 0;
    for (const t of tals) { slot.set(t, o); o += t.length; }
    return slot;
  });
}

/** The text if it is printable ASCII of at most maxLength; spaces become '_' inside EDF+ subfields. */
function printable(text: string, field: string, maxLength: number, subfield = true): string {
  const t = subfield ? text.replace(/ /g, '_') : text;
  if (t.length === 0 || t.length > maxLength || !/^[\x20-\x7e]+$/.test(t)) {
    throw new ParamError(field, `expected 1 to ${maxLength} printable ASCII characters, got ${JSON.stringify(text)}`);
  }
  return t;
}
