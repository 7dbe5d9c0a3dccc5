import type uPlot from 'uplot';
import { AXIS_FONT, type chartColours } from './chart-colours';

type Colours = ReturnType<typeof chartColours>;

/**
 * A chart that only shows: no legend, no cursor, no drag selection; `padding` as uPlot's
 * [top, right, bottom, left] in CSS pixels.
 */
export function staticChart(width: number, height: number, padding: uPlot.Padding) {
  return {
    width, height, legend: { show: false }, cursor: { show: false },
    select: { show: false, left: 0, top: 0, width: 0, height: 0 },
    padding,
  } satisfies Partial<uPlot.Options>;
}

/**
 * The frame of the per-trial charts of a session (running accuracy, trial probabilities): x is
 * the trial number and always spans at least trials 1 to 10, with `pad` trials of room either
 * side; y runs 0 to 1 with grid lines at the quarters, labelled by `yLabel`. Grid lines across x
 * only when `xGrid`.
 */
export function trialChartFrame(
  width: number,
  height: number,
  c: Colours,
  look: { pad: number; xGrid: boolean; yLabel: (v: number) => string },
): Omit<uPlot.Options, 'series'> {
  const { pad, xGrid, yLabel } = look;
  return {
    ...staticChart(width, height, [8, 10, 0, 0]),
    scales: { x: { time: false, range: (_u, lo, hi) => [Math.min(lo, 1) - pad, Math.max(hi, 10) + pad] }, y: { auto: false, range: [0, 1] } },
    axes: [
      { stroke: c.muted, font: AXIS_FONT, grid: xGrid ? { stroke: c.grid, width: 1 } : { show: false }, ticks: { show: false }, size: 26 },
      { stroke: c.muted, font: AXIS_FONT, grid: { stroke: c.grid, width: 1 }, ticks: { show: false }, size: 40,
        splits: () => [0, 0.25, 0.5, 0.75, 1], values: (_u, s) => s.map(yLabel) },
    ],
  };
}
