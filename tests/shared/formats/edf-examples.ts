/**
 * The byte-exact example files of REFERENCES.md §7, built in the tests instead of committed:
 * the same struct-style construction as ../shared/refvalues/edf_examples.py (EDF+C) and
 * tests/fixtures/formats/make_edf_examples.py (BDF, BDF+C). The tests check each build against
 * the SHA-256 and size the Python scripts recorded in edf_examples.json, so a difference in any
 * byte fails before the reader is tested on it.
 */

/** ASCII text left-aligned and space-padded to `w` bytes (the EDF header field rule). */
function field(s: string, w: number): number[] {
  if (s.length > w) throw new Error(`'${s}' is longer than ${w}`);
  return [...Buffer.from(s.padEnd(w, ' '), 'ascii')];
}

interface Signal { label: string; trans: string; dim: string; pmin: string; pmax: string; dmin: string; dmax: string; pre: string; n: string }

function header(version: number[], fixed: [string, string, string, string, string], records: string, signals: Signal[]): number[] {
  const ns = signals.length;
  const [patient, recording, date, time, reserved] = fixed;
  const out = [...version, ...field(patient, 80), ...field(recording, 80), ...field(date, 8), ...field(time, 8),
    ...field(String(256 * (ns + 1)), 8), ...field(reserved, 44), ...field(records, 8), ...field('1', 8), ...field(String(ns), 4)];
  const widths: [keyof Signal, number][] = [['label', 16], ['trans', 80], ['dim', 8], ['pmin', 8], ['pmax', 8], ['dmin', 8], ['dmax', 8], ['pre', 80], ['n', 8]];
  for (const [key, w] of widths) for (const s of signals) out.push(...field(s[key], w));
  out.push(...new Array<number>(32 * ns).fill(0x20));
  return out;
}

/** A time-stamped annotation list (EDF+ TAL), as edf_examples.py's tal(). */
function tal(onset: string, duration: string | null, texts: string[]): number[] {
  let s = onset;
  if (duration !== null) s += `\x15${duration}`;
  s += '\x14';
  for (const t of texts) s += `${t}\x14`;
  if (texts.length === 0) s += '\x14';
  return [...Buffer.from(`${s}\x00`, 'utf8')];
}

const padTo = (b: number[], n: number) => [...b, ...new Array<number>(n - b.length).fill(0)];
const int16le = (xs: number[]) => xs.flatMap((v) => [v & 0xff, (v >> 8) & 0xff]);

/** edfplus_example.edf: 'EEG Cz' at 4 Hz + 'EDF Annotations' (30 samples), two 1-s records, 904 bytes. */
export function edfPlusExample(): Uint8Array {
  const hdr = header(field('0', 8), ['X X X X', 'Startdate 01-JAN-2024 X X X', '01.01.24', '10.00.00', 'EDF+C'], '2', [
    { label: 'EEG Cz', trans: 'AgAgCl electrode', dim: 'uV', pmin: '-3276.8', pmax: '3276.7', dmin: '-32768', dmax: '32767', pre: 'HP:0.1Hz LP:75Hz', n: '4' },
    { label: 'EDF Annotations', trans: '', dim: '', pmin: '-1', pmax: '1', dmin: '-32768', dmax: '32767', pre: '', n: '30' },
  ]);
  const rec0 = padTo([...tal('+0', null, []), ...tal('+0.5', '2', ['T1']), ...tal('+0.75', null, ['Eyes closed'])], 60);
  const rec1 = padTo(tal('+1', null, []), 60);
  return Uint8Array.from([...hdr, ...int16le([0, 1000, -32768, 32767]), ...rec0, ...int16le([1, -1, 2, -2]), ...rec1]);
}

/** The five worked 24-bit triples of REFERENCES.md §7. */
export const BDF_TRIPLES = [[0x01, 0x00, 0x80], [0xff, 0xff, 0x7f], [0xff, 0xff, 0xff], [0x00, 0x00, 0x00], [0x10, 0x27, 0x00]];

/** bdf_example.bdf (plus false) or bdfplus_example.bdf (plus true): one 'Status' signal holding the triples, one 1-s record. */
export function bdfExample(plus: boolean): Uint8Array {
  const signals: Signal[] = [{ label: 'Status', trans: '', dim: '', pmin: '-8388608', pmax: '8388607', dmin: '-8388608', dmax: '8388607', pre: '', n: '5' }];
  let ann: number[] = [];
  if (plus) {
    ann = padTo([...Buffer.from('+0\x14\x14\x00+0.25\x150.5\x14Cue left\x14\x00', 'ascii')], 30); // 10 three-byte slots
    signals.push({ label: 'BDF Annotations', trans: '', dim: '', pmin: '-1', pmax: '1', dmin: '-8388608', dmax: '8388607', pre: '', n: '10' });
  }
  const hdr = header([0xff, ...Buffer.from('BIOSEMI', 'ascii')], ['X X X X', 'Startdate 02-MAR-2002 X X X', '02.03.02', '13.14.15',
    plus ? 'BDF+C' : '24BIT'], '1', signals);
  return Uint8Array.from([...hdr, ...BDF_TRIPLES.flat(), ...ann]);
}
