/**
 * Time-stamped Annotation Lists (TALs) of the EDF+ 'EDF Annotations' signal
 * (Kemp & Olivan 2003, §2.2.2): onset [0x15 duration] 0x14 text 0x14 [text 0x14 ...] 0x00.
 * Onset: '+' or '-' then seconds (decimals allowed) from the header start time; duration:
 * unsigned seconds; texts: UTF-8. The first TAL of a record in the first annotation signal is
 * the time-keeping TAL: its first text is empty and its onset is the record's start.
 */
import { formatTalSeconds } from './edf-fields';
import { ParamError } from '../types';
import { EdfFormatError } from './edf-types';

/** One parsed TAL. */
export interface Tal {
  onsetS: number;
  durationS: number | null;
  texts: string[];
}

const ONSET = /^[+-](\d+\.?\d*|\.\d+)$/;
const DURATION = /^(\d+\.?\d*|\.\d+)$/;
const utf8 = new TextDecoder('utf-8');
const utf8Encoder = new TextEncoder();

function decode(bytes: Uint8Array, start: number, end: number): string {
  let ascii = true;
  for (let i = start; i < end; i++) if (bytes[i]! >= 0x80) { ascii = false; break; }
  if (!ascii) return utf8.decode(bytes.subarray(start, end));
  let s = '';
  for (let i = start; i < end; i++) s += String.fromCharCode(bytes[i]!);
  return s;
}

/**
 * Parses the TALs in bytes[start, end) (one annotation signal of one record). Runs of 0x00 are
 * padding. A TAL may end at the slot's end without its 0x00 (nothing else fits there).
 * @param where used in error messages, e.g. 'record 12'
 * @throws EdfFormatError('annotations') for a TAL without 0x14 or a malformed onset/duration
 */
export function parseTals(bytes: Uint8Array, start: number, end: number, where: string): Tal[] {
  const tals: Tal[] = [];
  let pos = start;
  while (pos < end) {
    if (bytes[pos] === 0) { pos++; continue; }
    let stop = pos;
    while (stop < end && bytes[stop] !== 0) stop++;
    let sep = pos;
    while (sep < stop && bytes[sep] !== 0x14) sep++;
    if (sep === stop) throw new EdfFormatError('annotations', `${where}: TAL at byte ${pos - start} has no 0x14 separator`);
    let dur = pos;
    while (dur < sep && bytes[dur] !== 0x15) dur++;
    const onsetText = decode(bytes, pos, dur);
    if (!ONSET.test(onsetText)) throw new EdfFormatError('annotations', `${where}: bad TAL onset '${onsetText}'`);
    let durationS: number | null = null;
    if (dur < sep) {
      const durationText = decode(bytes, dur + 1, sep);
      if (!DURATION.test(durationText)) throw new EdfFormatError('annotations', `${where}: bad TAL duration '${durationText}'`);
      durationS = Number(durationText);
    }
    const texts: string[] = [];
    let textStart = sep + 1;
    for (let i = sep + 1; i < stop; i++) {
      if (bytes[i] === 0x14) { texts.push(decode(bytes, textStart, i)); textStart = i + 1; }
    }
    if (textStart < stop) texts.push(decode(bytes, textStart, stop)); // last text without its 0x14
    tals.push({ onsetS: Number(onsetText), durationS, texts });
    pos = stop + 1;
  }
  return tals;
}

/** Signed TAL onset text: '+0', '+12.5', '-0.25'. */
function signedSeconds(onsetS: number): string {
  return (onsetS < 0 ? '-' : '+') + formatTalSeconds(Math.abs(onsetS));
}

/**
 * Encodes one TAL. With no texts it is a time-keeping TAL ('+r' 0x14 0x14 0x00).
 * @throws ParamError('annotations') for non-finite times, a negative duration, or a text
 *   that is empty or contains 0x00, 0x14 or 0x15 (they would break the TAL)
 */
export function encodeTal(onsetS: number, durationS: number | null, texts: string[]): Uint8Array {
  if (!Number.isFinite(onsetS)) throw new ParamError('annotations', `onset must be finite, got ${onsetS}`);
  let head = signedSeconds(onsetS);
  if (durationS !== null) {
    if (!Number.isFinite(durationS) || durationS < 0) {
      throw new ParamError('annotations', `duration must be finite and >= 0, got ${durationS}`);
    }
    head += '\x15' + formatTalSeconds(durationS);
  }
  const parts: Uint8Array[] = [utf8Encoder.encode(head + '\x14')];
  if (texts.length === 0) parts.push(Uint8Array.of(0x14));
  for (const t of texts) {
    if (t.length === 0 || /[\x00\x14\x15]/.test(t)) {
      throw new ParamError('annotations', `annotation text must be non-empty without 0x00/0x14/0x15, got ${JSON.stringify(t)}`);
    }
    parts.push(utf8Encoder.encode(t + '\x14'));
  }
  parts.push(Uint8Array.of(0));
  let n = 0;
  for (const p of parts) n += p.length;
  const out = new Uint8Array(n);
  let o = 0;
  for (const p of parts) { out.set(p, o); o += p.length; }
  return out;
}
