/** Number wording of the review's sentences (framework-free; the UI and PDF format figures themselves). */

/** 0.7234 -> "72.3 %"; NaN/null -> "n/a". */
export function pctText(v: number | null | undefined, digits = 1): string {
  return v === null || v === undefined || !Number.isFinite(v) ? 'n/a' : `${(v * 100).toFixed(digits)} %`;
}

/** 0.052 -> "+5.2 points"; signed percentage points. */
export function pointsText(v: number): string {
  const s = (v * 100).toFixed(1);
  return `${v > 0 ? '+' : ''}${s} points`;
}

/** [0.1, 0.3] -> "10.0 % to 30.0 %". */
export function rangeText(r: readonly [number, number]): string {
  return `${pctText(r[0])} to ${pctText(r[1])}`;
}

/** [-0.1, 0.3] -> "-10.0 to +30.0 points". */
export function pointsRangeText(r: readonly [number, number]): string {
  const f = (v: number) => `${v > 0 ? '+' : ''}${(v * 100).toFixed(1)}`;
  return `${f(r[0])} to ${f(r[1])} points`;
}

/** "1 trial" / "3 trials". */
export function plural(n: number, word: string, many = `${word}s`): string {
  return `${n} ${n === 1 ? word : many}`;
}

/** p value as text: "p = 0.031", "p < 0.001". */
export function pText(p: number): string {
  return p < 0.001 ? 'p < 0.001' : `p = ${p.toFixed(3)}`;
}

/**
 * A review figure as text: fractions as %, differences as signed points, counts plain, seconds
 * and ms with their unit, log-odds to 2 decimals, p values as pText; "n/a" when value is null.
 * The interval, when present, follows in brackets ("72.5 % (57.2 % to 83.9 %)").
 */
export function figureText(f: { value: number | null; unit: string; interval?: readonly [number, number]; text?: string }): string {
  if (f.unit === 'text') return f.text ?? '';
  if (f.value === null || !Number.isFinite(f.value)) return 'n/a';
  const v = f.value;
  switch (f.unit) {
    case 'fraction': return f.interval ? `${pctText(v)} (${rangeText(f.interval)})` : pctText(v);
    case 'difference': return f.interval ? `${pointsText(v)} (${pointsRangeText(f.interval)})` : pointsText(v);
    case 'count': return String(Math.round(v * 100) / 100);
    case 'seconds': return `${v.toFixed(2)} s`;
    case 'ms': return `${v < 10 ? v.toFixed(2) : v.toFixed(1)} ms`;
    case 'logit': return v.toFixed(2);
    case 'p': return v < 0.001 ? '< 0.001' : v.toFixed(3);
    default: return String(v);
  }
}

/** Verdict words as the review shows them. */
export const VERDICT_LABEL = { likely: 'Likely', possible: 'Possible', unlikely: 'Unlikely' } as const;
