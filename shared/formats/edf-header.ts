/**
 * EDF / EDF+ / BDF / BDF+ header reader with validation.
 * Layout (Kemp et al. 1992, Table 1): a 256-byte fixed header, then ns x 256 bytes of
 * per-signal fields stored field by field (all labels, then all transducers, ...).
 * EDF+ rules (Kemp & Olivan 2003): reserved field 'EDF+C'/'EDF+D', ASCII 32-126 only,
 * dmax > dmin, pmax != pmin, records != -1, start-date clipping at 1985.
 */
import {
  fieldText, isCalendarDate, isoLocal, MONTHS, parseDecimalField, parseIntegerField, requireAscii,
} from './edf-fields';
import {
  BDF_DIGITAL_RANGE, DEFAULT_MAX_BYTES, EDF_DIGITAL_RANGE, EdfFormatError, MAX_SIGNALS,
  type EdfFormat, type EdfHeader, type EdfReadOptions, type EdfSignalHeader,
} from './edf-types';

/** Fixed header fields: [name used in errors, offset, width]. */
const FIXED = {
  version: [0, 8], patientId: [8, 80], recordingId: [88, 80], startDate: [168, 8],
  startTime: [176, 8], headerBytes: [184, 8], reserved: [192, 44], records: [236, 8],
  recordDurationS: [244, 8], signalCount: [252, 4],
} as const;
type FixedField = keyof typeof FIXED;

/** Per-signal fields in file order with their widths (sum 256). */
const PER_SIGNAL = [
  ['label', 16], ['transducer', 80], ['physicalDimension', 8], ['physicalMin', 8], ['physicalMax', 8],
  ['digitalMin', 8], ['digitalMax', 8], ['prefiltering', 80], ['samplesPerRecord', 8], ['reserved', 32],
] as const;

const ANNOTATION_LABELS = new Set(['EDF Annotations', 'BDF Annotations']);
const BIOSEMI = [0x42, 0x49, 0x4f, 0x53, 0x45, 0x4d, 0x49]; // 'BIOSEMI'

/** Options for reading a header from the first bytes of a file. */
export interface EdfHeaderOptions extends EdfReadOptions {
  /** Total file length when `bytes` is only the start of the file; default bytes.length. */
  fileSize?: number;
}

/**
 * Reads and validates the header (fixed + per-signal) and checks the file size:
 * headerBytes + records * recordBytes must equal the file length. Allocates nothing in
 * proportion to the claimed sizes. Cost: O(ns).
 * @param bytes the file, or at least its first 256 * (ns + 1) bytes with opts.fileSize set
 * @throws EdfFormatError naming the field
 */
export function readEdfHeader(bytes: Uint8Array, opts: EdfHeaderOptions = {}): EdfHeader {
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  const fileSize = opts.fileSize ?? bytes.length;
  if (fileSize > maxBytes) {
    throw new EdfFormatError('maxBytes', `file of ${fileSize} bytes exceeds the limit of ${maxBytes} bytes`);
  }
  if (bytes.length < 256) {
    throw new EdfFormatError('header', `truncated: ${bytes.length} bytes, the fixed header alone is 256`);
  }
  const text = (f: FixedField) => fieldText(bytes, FIXED[f][0], FIXED[f][1]);

  // The version first: for a file that is not EDF at all, that is the useful message.
  const isBdf = bytes[0] === 0xff && BIOSEMI.every((c, i) => bytes[i + 1] === c);
  if (!isBdf) requireAscii(bytes, 0, 8, 'version');
  const version = isBdf ? 'BIOSEMI' : text('version');
  if (!isBdf && version.trim() !== '0') {
    throw new EdfFormatError('version', `expected '0' (EDF) or 0xFF 'BIOSEMI' (BDF), got '${version}'`);
  }
  for (const f of Object.keys(FIXED) as FixedField[]) {
    if (f !== 'version') requireAscii(bytes, FIXED[f][0], FIXED[f][1], f);
  }

  const ns = parseIntegerField(text('signalCount'), 'signalCount');
  if (ns < 1 || ns > MAX_SIGNALS) {
    throw new EdfFormatError('signalCount', `expected 1 to ${MAX_SIGNALS} signals, got ${ns}`);
  }
  const headerBytes = parseIntegerField(text('headerBytes'), 'headerBytes');
  if (headerBytes !== 256 * (ns + 1)) {
    throw new EdfFormatError('headerBytes', `expected 256 * (ns + 1) = ${256 * (ns + 1)} for ${ns} signals, got ${headerBytes}`);
  }
  if (bytes.length < headerBytes) {
    throw new EdfFormatError('header', `truncated: ${bytes.length} bytes, the header of ${ns} signals is ${headerBytes}`);
  }

  const reserved = text('reserved');
  const format = detectFormat(isBdf, reserved);
  const isPlus = format.includes('+');
  const bytesPerSample = isBdf ? 3 : 2;
  const signals = readSignalHeaders(bytes, ns, isBdf);

  const recordDurationS = parseDecimalField(text('recordDurationS'), 'recordDurationS');
  if (recordDurationS < 0) throw new EdfFormatError('recordDurationS', `must be >= 0, got ${recordDurationS}`);
  const firstOrdinary = signals.find((s) => !s.isAnnotation);
  if (recordDurationS === 0 && firstOrdinary) {
    throw new EdfFormatError('recordDurationS', `0 is allowed only without ordinary signals; '${firstOrdinary.label}' is one`);
  }
  for (const s of signals) s.sampleRateHz = recordDurationS > 0 ? s.samplesPerRecord / recordDurationS : 0;

  let samplesPerRecordSum = 0;
  for (const s of signals) samplesPerRecordSum += s.samplesPerRecord;
  const recordBytes = bytesPerSample * samplesPerRecordSum;
  const records = checkSize(parseIntegerField(text('records'), 'records'), isPlus, headerBytes, recordBytes, fileSize, maxBytes);

  const patientId = text('patientId');
  const recordingId = text('recordingId');
  const startDateField = text('startDate');
  const startTimeField = text('startTime');
  const startTime = parseStart(startDateField, startTimeField, isPlus ? recordingId : null);

  return {
    format, bytesPerSample, version, patientId, recordingId, startDateField, startTimeField, startTime,
    headerBytes, reserved, records, recordDurationS, recordBytes, signals,
  };
}

function detectFormat(isBdf: boolean, reserved: string): EdfFormat {
  const tag = reserved.slice(0, 5);
  if (!isBdf) return tag === 'EDF+C' ? 'EDF+C' : tag === 'EDF+D' ? 'EDF+D' : 'EDF';
  // BDF+ writers put 'BDF+C'/'BDF+D' in the reserved field; an 'EDF+' tag in a BDF file is read alike.
  if (tag === 'BDF+C' || tag === 'EDF+C') return 'BDF+C';
  if (tag === 'BDF+D' || tag === 'EDF+D') return 'BDF+D';
  return 'BDF';
}

function readSignalHeaders(bytes: Uint8Array, ns: number, isBdf: boolean): EdfSignalHeader[] {
  const raw: Record<string, string>[] = Array.from({ length: ns }, () => ({}));
  let offset = 256;
  for (const [name, width] of PER_SIGNAL) {
    for (let i = 0; i < ns; i++) {
      const start = offset + i * width;
      requireAscii(bytes, start, width, `signals[${i}].${name}`);
      raw[i]![name] = fieldText(bytes, start, width);
    }
    offset += ns * width;
  }
  const [dLow, dHigh] = isBdf ? BDF_DIGITAL_RANGE : EDF_DIGITAL_RANGE;
  return raw.map((r, i) => {
    const f = (name: string) => `signals[${i}].${name}`;
    const label = r.label!;
    const isAnnotation = ANNOTATION_LABELS.has(label.trim());
    const physicalMin = parseDecimalField(r.physicalMin!, f('physicalMin'));
    const physicalMax = parseDecimalField(r.physicalMax!, f('physicalMax'));
    const digitalMin = parseIntegerField(r.digitalMin!, f('digitalMin'));
    const digitalMax = parseIntegerField(r.digitalMax!, f('digitalMax'));
    const samplesPerRecord = parseIntegerField(r.samplesPerRecord!, f('samplesPerRecord'));
    if (samplesPerRecord < 1) throw new EdfFormatError(f('samplesPerRecord'), `must be >= 1, got ${samplesPerRecord}`);
    // Scaling rules matter only for ordinary signals; an annotation signal's samples are text.
    if (!isAnnotation) {
      if (digitalMin < dLow || digitalMin > dHigh) throw new EdfFormatError(f('digitalMin'), `${digitalMin} is outside ${dLow}..${dHigh}`);
      if (digitalMax < dLow || digitalMax > dHigh) throw new EdfFormatError(f('digitalMax'), `${digitalMax} is outside ${dLow}..${dHigh}`);
      if (digitalMax <= digitalMin) throw new EdfFormatError(f('digitalMax'), `must exceed digitalMin (${digitalMin}), got ${digitalMax}`);
      if (physicalMax === physicalMin) throw new EdfFormatError(f('physicalMax'), `must differ from physicalMin (${physicalMin})`);
    }
    return {
      label, transducer: r.transducer!, physicalDimension: r.physicalDimension!, physicalMin, physicalMax,
      digitalMin, digitalMax, prefiltering: r.prefiltering!, samplesPerRecord, reserved: r.reserved!,
      sampleRateHz: 0, isAnnotation,
    };
  });
}

/** Checks headerBytes + records * recordBytes against the file length; returns the record count. */
function checkSize(claimed: number, isPlus: boolean, headerBytes: number, recordBytes: number,
                   fileSize: number, maxBytes: number): number {
  let records = claimed;
  if (records === -1) {
    if (isPlus) throw new EdfFormatError('records', '-1 (still recording) is not allowed in a finished EDF+/BDF+ file');
    // Plain EDF/BDF: -1 means the writer never closed the file; infer the count from the size.
    records = Math.floor((fileSize - headerBytes) / recordBytes);
  } else if (records < 0) {
    throw new EdfFormatError('records', `must be >= 0, got ${records}`);
  }
  const claimedBytes = headerBytes + records * recordBytes;
  if (claimedBytes > maxBytes) {
    throw new EdfFormatError('records', `${records} records of ${recordBytes} bytes claim ${claimedBytes} bytes, ` +
      `above the limit of ${maxBytes} bytes`);
  }
  if (claimedBytes !== fileSize) {
    const what = claimedBytes > fileSize ? 'truncated' : 'has trailing bytes';
    throw new EdfFormatError('fileSize', `file ${what}: ${fileSize} bytes, but header ${headerBytes} + ` +
      `${records} records x ${recordBytes} bytes = ${claimedBytes}`);
  }
  return records;
}

/** Start date-time; the EDF+ recording id 'Startdate dd-MMM-yyyy' gives the full year. */
function parseStart(dateField: string, timeField: string, recordingId: string | null): string {
  const d = /^(\d\d)\.(\d\d)\.(\d\d|yy)$/.exec(dateField.trim());
  if (!d) throw new EdfFormatError('startDate', `expected dd.mm.yy, got '${dateField}'`);
  const t = /^(\d\d)\.(\d\d)\.(\d\d)$/.exec(timeField.trim());
  if (!t) throw new EdfFormatError('startTime', `expected hh.mm.ss, got '${timeField}'`);
  const [h, m, s] = [Number(t[1]), Number(t[2]), Number(t[3])];
  if (h > 23 || m > 59 || s > 59) throw new EdfFormatError('startTime', `not a time of day: '${timeField}'`);

  let day = Number(d[1]);
  let month = Number(d[2]);
  let year = d[3] === 'yy' ? NaN : Number(d[3]);
  year = year >= 85 ? 1900 + year : 2000 + year;
  // 2000 is a leap year, so a 'yy' date (after 2084) is checked for day and month only.
  if (!isCalendarDate(Number.isNaN(year) ? 2000 : year, month, day)) {
    throw new EdfFormatError('startDate', `not a calendar date: '${dateField}'`);
  }
  const r = recordingId === null ? null : /^Startdate (\d\d)-([A-Z]{3})-(\d{4})(?: |$)/.exec(recordingId);
  const rMonth = r ? MONTHS.indexOf(r[2] as (typeof MONTHS)[number]) + 1 : 0;
  if (r && rMonth > 0 && isCalendarDate(Number(r[3]), rMonth, Number(r[1]))) {
    [day, month, year] = [Number(r[1]), rMonth, Number(r[3])];
  } else if (Number.isNaN(year)) {
    throw new EdfFormatError('startDate', "'yy' (after 2084) needs 'Startdate dd-MMM-yyyy' in the recording id");
  }
  return isoLocal(year, month, day, h, m, s);
}
