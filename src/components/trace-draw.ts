/**
 * Drawing of the live trace inside uPlot's draw hook (LiveTraceChart.vue). All channels of one
 * colour go into ONE canvas path and one stroke: with 64 channels, stroking 64 separate uPlot
 * series cost several times more per frame (measured in the browser, headless Chromium).
 */
import type uPlot from 'uplot';
import type { CueMark } from '../composables/useLiveFeed';
import { token } from '../composables/canvas';
import type { QualityLook } from './quality';

export interface TraceColours {
  line: string;
  grid: string;
  muted: string;
  cue: string;
}

export function traceColours(): TraceColours {
  return {
    line: token('--ac-ink-700', '#33454f'),
    grid: token('--ac-line', '#d6dee0'),
    muted: token('--ac-ink-500', '#5d6e77'),
    cue: token('--ac-petrol-500', '#2a8290'),
  };
}

/** Points to draw: `count` samples of times (s) and of each channel's already offset y values. */
export interface TracePoints {
  timesS: Float64Array;
  ys: Float64Array[]; // [channel][point]
  count: number;
}

/**
 * Stroke every channel, one path per distinct colour, clipped to the plot box (canvas pixels).
 * `range` maps data to the box: x0..x1 seconds across, y0..y1 rows bottom to top.
 */
export function drawTraces(ctx: CanvasRenderingContext2D, box: uPlot.BBox,
  range: { x0: number; x1: number; y0: number; y1: number }, pts: TracePoints, colourOf: readonly string[]): void {
  if (pts.count === 0) return;
  const { left, top, width, height } = box;
  const kx = width / (range.x1 - range.x0);
  const ky = height / (range.y1 - range.y0);
  const bottom = top + height;
  const groups = new Map<string, number[]>();
  colourOf.forEach((colour, c) => {
    const list = groups.get(colour);
    if (list) list.push(c);
    else groups.set(colour, [c]);
  });
  const { timesS, ys, count } = pts;
  ctx.save();
  ctx.beginPath();
  ctx.rect(left, top, width, height);
  ctx.clip();
  ctx.lineWidth = Math.max(1, (window.devicePixelRatio || 1) * 0.9);
  ctx.lineJoin = 'round';
  for (const [colour, channels] of groups) {
    ctx.strokeStyle = colour;
    ctx.beginPath();
    for (const c of channels) {
      const y = ys[c]!;
      ctx.moveTo(left + (timesS[0]! - range.x0) * kx, bottom - (y[0]! - range.y0) * ky);
      for (let i = 1; i < count; i++) ctx.lineTo(left + (timesS[i]! - range.x0) * kx, bottom - (y[i]! - range.y0) * ky);
    }
    ctx.stroke();
  }
  ctx.restore();
}

/** Channel labels left of the plot (quality-coloured, with a dot when not normal) and cue marks with their class. */
export function drawTraceOverlay(u: uPlot, channelNames: readonly string[], offsets: ArrayLike<number>,
  looks: readonly QualityLook[], cues: readonly CueMark[], col: TraceColours): void {
  const ctx = u.ctx;
  const ratio = window.devicePixelRatio || 1;
  const { left, top, width, height } = u.bbox;
  ctx.save();
  ctx.font = `${Math.round((channelNames.length > 40 ? 9 : 10.5) * ratio)}px "IBM Plex Mono", monospace`;
  ctx.textAlign = 'right';
  ctx.textBaseline = 'middle';
  channelNames.forEach((name, c) => {
    const y = u.valToPos(offsets[c]!, 'y', true);
    const colour = looks[c]?.colour;
    ctx.fillStyle = colour ?? col.muted;
    ctx.fillText(name, left - 12 * ratio, y);
    if (colour) {
      ctx.beginPath();
      ctx.arc(left - 5 * ratio, y, 2.5 * ratio, 0, 2 * Math.PI);
      ctx.fill();
    }
  });
  ctx.textAlign = 'left';
  ctx.textBaseline = 'top';
  ctx.font = `${Math.round(10.5 * ratio)}px "IBM Plex Sans", sans-serif`;
  for (const cue of cues) {
    if (!Number.isFinite(cue.timeS)) continue;
    const x = u.valToPos(cue.timeS, 'x', true);
    if (x < left || x > left + width) continue;
    ctx.strokeStyle = col.cue;
    ctx.lineWidth = 1.5 * ratio;
    ctx.setLineDash([4 * ratio, 3 * ratio]);
    ctx.beginPath();
    ctx.moveTo(x, top - 10 * ratio);
    ctx.lineTo(x, top + height);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.fillStyle = col.cue;
    ctx.fillText(cue.classLabel ?? 'cue', x + 4 * ratio, top - 12 * ratio);
  }
  ctx.restore();
}
