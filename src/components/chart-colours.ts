import { token } from '../composables/canvas';

/** Chart colours from the design tokens (canvas needs concrete colours, not CSS variables). */
export function chartColours() {
  return {
    ink: token('--ac-ink-900', '#15242c'),
    inkSoft: token('--ac-ink-700', '#33454f'),
    muted: token('--ac-ink-500', '#5d6e77'),
    faint: token('--ac-ink-300', '#a8b4ba'),
    grid: token('--ac-line', '#d6dee0'),
    accent: token('--ac-petrol-600', '#1c6a74'),
    accentSoft: token('--ac-petrol-100', '#dcecec'),
    correct: token('--ac-green-600', '#2d7653'),
    incorrect: token('--ac-red-600', '#a8382d'),
    caution: token('--ac-amber-500', '#b7791f'),
    surface: token('--ac-surface', '#ffffff'),
  };
}

/** uPlot axis font, in CSS pixels. */
export const AXIS_FONT = '11px "IBM Plex Sans", system-ui, sans-serif';
export const MONO_FONT = '11px "IBM Plex Mono", monospace';

/** A percentage with one decimal: 0.725 -> '72.5 %'. */
export function pct(x: number | null | undefined, digits = 1): string {
  return x === null || x === undefined || !Number.isFinite(x) ? '—' : `${(x * 100).toFixed(digits)} %`;
}
