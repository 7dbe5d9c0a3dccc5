/** Display helpers shared by views. Dates are shown in the viewer's locale and time zone. */

const dateTime = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' });
const dateOnly = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium' });

/** An ISO 8601 timestamp as a local date and time; '—' when absent or unreadable. */
export function formatDateTime(iso: string | null | undefined): string {
  if (!iso) return '—';
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : dateTime.format(d);
}

/** A calendar date `YYYY-MM-DD` (no time zone shift: it is read as that day, not as UTC midnight). */
export function formatDate(ymd: string | null | undefined): string {
  if (!ymd) return '—';
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(ymd);
  if (!m) return formatDateTime(ymd);
  return dateOnly.format(new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
}

/** Seconds with a sign and two decimals at most: 0 -> '0 s', -0.5 -> '−0.5 s'. */
export function formatSeconds(s: number): string {
  const text = Number.isInteger(s) ? String(Math.abs(s)) : Math.abs(s).toFixed(2).replace(/0$/, '');
  return `${s < 0 ? '−' : ''}${text} s`;
}
