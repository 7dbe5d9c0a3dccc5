/**
 * Header field helpers shared by the EDF reader and writer: ASCII checks, strict number
 * parsing, and number formatting into fixed-width fields.
 * EDF header rules (Kemp et al. 1992; Kemp & Olivan 2003): every header byte is printable
 * ASCII 32-126, fields are left-justified and space-padded, the decimal separator is '.'.
 */
import { EdfFormatError } from './edf-types';

/** Index of the first byte outside printable ASCII 32-126 in bytes[start, start + width), or -1. */
export function firstNonPrintable(bytes: Uint8Array, start: number, width: number): number {
  for (let i = start; i < start + width; i++) {
    const b = bytes[i]!;
    if (b < 32 || b > 126) return i;
  }
  return -1;
}

/** Throws EdfFormatError(field) if bytes[start, start + width) holds a non-printable byte. */
export function requireAscii(bytes: Uint8Array, start: number, width: number, field: string): void {
  const at = firstNonPrintable(bytes, start, width);
  if (at >= 0) {
    throw new EdfFormatError(field, `header bytes must be printable ASCII (32-126); byte ${at} is ` +
      `0x${bytes[at]!.toString(16).padStart(2, '0')}`);
  }
}

/** The field as text (bytes already checked to be ASCII), trailing spaces removed. */
export function fieldText(bytes: Uint8Array, start: number, width: number): string {
  let end = start + width;
  while (end > start && bytes[end - 1] === 32) end--;
  let s = '';
  for (let i = start; i < end; i++) s += String.fromCharCode(bytes[i]!);
  return s;
}

const INTEGER = /^[+-]?\d+$/;
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)$/;

/** Strict integer field ('  -32768' is fine; '12a', '1.5', '' are not). */
export function parseIntegerField(text: string, field: string): number {
  const t = text.trim();
  if (!INTEGER.test(t)) throw new EdfFormatError(field, `expected an integer, got '${t}'`);
  return Number(t);
}

/** Strict decimal field with '.' as separator (no exponent, no comma). */
export function parseDecimalField(text: string, field: string): number {
  const t = text.trim();
  if (!DECIMAL.test(t)) {
    const hint = /^[+-]?\d*,\d+$/.test(t) ? " (the decimal separator must be '.')" : '';
    throw new EdfFormatError(field, `expected a decimal number, got '${t}'${hint}`);
  }
  return Number(t);
}

/**
 * Formats x into at most `width` characters as a plain decimal, rounded towards -Infinity
 * ('down') or +Infinity ('up'), keeping as many decimals as fit. Used for physical min/max so
 * the written range still contains the data. Returns null when x cannot fit at all.
 */
export function formatDecimalField(x: number, width: number, direction: 'down' | 'up'): string | null {
  if (!Number.isFinite(x)) return null;
  const exact = Object.is(x, -0) ? '0' : String(x);
  if (exact.length <= width && !/e/i.test(exact)) return exact;
  for (let decimals = width - 1; decimals >= 0; decimals--) {
    const scale = 10 ** decimals;
    const scaled = x * scale;
    const nearest = Math.round(scaled);
    // Binary noise (1.1 * 1e7 = 11000000.000000002) must not push the value a unit outward.
    const k = Math.abs(scaled - nearest) <= 1e-12 * Math.max(1, Math.abs(scaled)) ? nearest
      : direction === 'down' ? Math.floor(scaled) : Math.ceil(scaled);
    if (!Number.isSafeInteger(k)) continue;
    let s = (k / scale).toFixed(decimals);
    if (s.includes('.')) s = s.replace(/0+$/, '').replace(/\.$/, '');
    if (s === '-0') s = '0';
    if (s.length <= width) return s;
  }
  return null;
}

/**
 * Seconds in TAL notation (EDF+ §2.2.2): plain decimal, no exponent, shortest form that reads
 * back as the same double. The sign is added by the caller.
 */
export function formatTalSeconds(magnitude: number): string {
  const s = String(magnitude);
  if (!/e/i.test(s)) return s;
  // Below 1e-6 JavaScript switches to exponent notation; 20 decimals keep the value's digits.
  return magnitude.toFixed(20).replace(/0+$/, '').replace(/\.$/, '');
}

/** Left-justified, space-padded ASCII field; throws `errorField` if the text does not fit. */
export function asciiField(text: string, width: number, errorField: string): Uint8Array {
  if (text.length > width) throw new EdfFormatError(errorField, `'${text}' is longer than ${width} characters`);
  const out = new Uint8Array(width).fill(32);
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 32 || c > 126) throw new EdfFormatError(errorField, `character ${i} of '${text}' is not printable ASCII`);
    out[i] = c;
  }
  return out;
}

/** English month abbreviations of EDF+ dates (dd-MMM-yyyy), upper case as the spec writes them. */
export const MONTHS = ['JAN', 'FEB', 'MAR', 'APR', 'MAY', 'JUN', 'JUL', 'AUG', 'SEP', 'OCT', 'NOV', 'DEC'] as const;

/** True when (year, month 1-12, day) is a real calendar date. */
export function isCalendarDate(year: number, month: number, day: number): boolean {
  if (month < 1 || month > 12 || day < 1) return false;
  const d = new Date(Date.UTC(year, month - 1, day));
  return d.getUTCFullYear() === year && d.getUTCMonth() === month - 1 && d.getUTCDate() === day;
}

/** 'YYYY-MM-DDTHH:MM:SS' from parts (no zone). */
export function isoLocal(year: number, month: number, day: number, h: number, m: number, s: number): string {
  const p = (n: number, w = 2) => String(n).padStart(w, '0');
  return `${p(year, 4)}-${p(month)}-${p(day)}T${p(h)}:${p(m)}:${p(s)}`;
}
