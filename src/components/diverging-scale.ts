/**
 * A diverging colour scale centred on zero, for weights and scalp maps whose sign matters:
 * cool blue below zero, a near-white middle, warm red above. Symmetric limits (±max|x|) keep
 * zero in the middle. Common practice for signed maps (e.g. Brewer 1994 on diverging schemes);
 * the stops are our own.
 */
type Rgb = [number, number, number];

const STOPS: readonly { at: number; rgb: Rgb }[] = [
  { at: 0, rgb: [33, 80, 132] },
  { at: 0.25, rgb: [110, 160, 200] },
  { at: 0.5, rgb: [246, 246, 242] },
  { at: 0.75, rgb: [230, 150, 118] },
  { at: 1, rgb: [168, 52, 40] },
];

/** Colour of `x` on a scale from -limit to +limit (clamped); NaN gives transparent. */
export function divergingRgba(x: number, limit: number): [number, number, number, number] {
  if (!Number.isFinite(x)) return [0, 0, 0, 0];
  const t = limit > 0 ? Math.max(0, Math.min(1, 0.5 + x / (2 * limit))) : 0.5;
  let i = 0;
  while (i < STOPS.length - 2 && t > STOPS[i + 1]!.at) i++;
  const a = STOPS[i]!, b = STOPS[i + 1]!;
  const f = (t - a.at) / (b.at - a.at);
  return [
    Math.round(a.rgb[0] + f * (b.rgb[0] - a.rgb[0])),
    Math.round(a.rgb[1] + f * (b.rgb[1] - a.rgb[1])),
    Math.round(a.rgb[2] + f * (b.rgb[2] - a.rgb[2])),
    255,
  ];
}

/** CSS gradient of the scale, left = -limit, right = +limit (for colour bars). */
export const DIVERGING_GRADIENT = `linear-gradient(to right, ${STOPS.map((s) => `rgb(${s.rgb.join(',')}) ${s.at * 100}%`).join(', ')})`;

/** The symmetric limit of a set of values: max |x| over the finite ones (0 when none). */
export function symmetricLimit(values: Iterable<number>): number {
  let m = 0;
  for (const v of values) if (Number.isFinite(v)) m = Math.max(m, Math.abs(v));
  return m;
}
