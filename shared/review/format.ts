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
