/**
 * Artifact limits relative to calibration data, per channel, from robust statistics: a trial is
 * flagged 'artifact' when any channel's peak-to-peak amplitude (filtered epoch) exceeds
 *   median_c + K · 1.4826 · MAD_c
 * of that channel's peak-to-peak over calibration windows of the epoch's length (median absolute
 * deviation scaled to the normal SD; Leys et al. 2013, J Exp Soc Psychol 49(4):764-766, who
 * suggest 2.5-3 for one variable; K = 5 here because a trial is tested on every channel at once).
 * A fixed limit such as 100 µV peak-to-peak cannot serve: on the eegmmidb recordings the raw
 * peak-to-peak in 0-4 s windows is mostly above 100 µV (median about 270 µV), so it would flag
 * every trial (../shared/data/eegmmidb/README.md).
 *
 * Calibration windows: the decoder's own calibration statistics when its artifact carries them;
 * otherwise the session's first minute (windows of the epoch length, half overlapping, skipping
 * any that overlap missing or non-finite samples), usable once MIN_WINDOWS are in and final at
 * one minute. The same windows give per-channel RMS limits for the console's quality flags.
 *
 * What it catches (`npx tsx bench/demo-flags.ts`: 80 simulated trials, 1-40 Hz + CAR, limits
 * from the first minute): the demo participant keeps still during trials (profile stillDuringEpochs), so only
 * pops and dropouts reach an epoch and 3 of 77 judged trials were flagged; with the same rates
 * (12 blinks, 4 saccades, 2 muscle bursts a minute) placed regardless of the cues, 17 of 77.
 * On eegmmidb (64 channels, 0.5-2.5 s) about one trial in ten.
 */

/** Robust z beyond which a channel's peak-to-peak (or RMS) counts as an artifact. */
export const ARTIFACT_K = 5;
/** MAD scaled to the standard deviation of a normal distribution. */
export const MAD_TO_SD = 1.4826;
/**
 * Windows needed before limits are used: with fewer, the MAD is too noisy (with 5 windows of
 * the demo data it came out at 2-5 % of the median and flagged ordinary trials).
 */
export const MIN_WINDOWS = 10;
/** Length of the session baseline, seconds. */
export const BASELINE_S = 60;
/**
 * Floor of the MAD as a fraction of the median, so a steady (or quantised) baseline does not
 * give a near-zero-width band. Common practice, not from a cited source.
 */
export const MAD_FLOOR_FRACTION = 0.05;

export type LimitsSource = 'decoder' | 'session-baseline';

/** Per-channel limits, µV. */
export interface ArtifactLimits {
  source: LimitsSource;
  windows: number;
  medianPeakToPeakUv: Float64Array;
  madPeakToPeakUv: Float64Array;
  peakToPeakLimitUv: Float64Array;
  rmsLimitUv: Float64Array;
  /** True once the baseline is complete (or the limits came from the decoder). */
  final: boolean;
}

function median(values: Float64Array): number {
  const s = Float64Array.from(values).sort();
  const n = s.length;
  if (n === 0) return NaN;
  return n % 2 === 1 ? s[(n - 1) / 2]! : (s[n / 2 - 1]! + s[n / 2]!) / 2;
}

/** median + K·1.4826·MAD per column of `rows` ([window][channel]); also returns median and MAD. */
export function robustLimits(rows: readonly Float64Array[], channels: number, k = ARTIFACT_K):
  { median: Float64Array; mad: Float64Array; limit: Float64Array } {
  const med = new Float64Array(channels), mad = new Float64Array(channels), limit = new Float64Array(channels);
  const col = new Float64Array(rows.length);
  for (let c = 0; c < channels; c++) {
    for (let w = 0; w < rows.length; w++) col[w] = rows[w]![c]!;
    const m = median(col);
    for (let w = 0; w < rows.length; w++) col[w] = Math.abs(rows[w]![c]! - m);
    const d = Math.max(median(col), MAD_FLOOR_FRACTION * Math.abs(m));
    med[c] = m;
    mad[c] = d;
    limit[c] = m + k * MAD_TO_SD * d;
  }
  return { median: med, mad, limit };
}

/** Channels (indices) whose peak-to-peak exceeds its limit. */
export function channelsBeyond(peakToPeak: Float64Array, limits: ArtifactLimits): number[] {
  const out: number[] = [];
  for (let c = 0; c < peakToPeak.length; c++) {
    const v = peakToPeak[c]!;
    if (!(v <= limits.peakToPeakLimitUv[c]!)) out.push(c);
  }
  return out;
}

/** Collects calibration windows from the session's first minute. */
export class BaselineCollector {
  private readonly pp: Float64Array[] = [];
  private readonly rms: Float64Array[] = [];
  private done = false;

  constructor(readonly channels: number, readonly windowSamples: number, readonly totalSamples: number) {}

  /** Window starts still to come: every half window from 0 while the window ends within the baseline. */
  get finished(): boolean { return this.done; }
  get windows(): number { return this.pp.length; }

  /** Adds one window's statistics (copied). */
  add(peakToPeak: Float64Array, rms: Float64Array): void {
    if (this.done) return;
    this.pp.push(Float64Array.from(peakToPeak));
    this.rms.push(Float64Array.from(rms));
  }

  finish(): void { this.done = true; }

  /** Current limits, or null while fewer than MIN_WINDOWS windows are in. */
  limits(): ArtifactLimits | null {
    if (this.pp.length < MIN_WINDOWS) return null;
    const pp = robustLimits(this.pp, this.channels);
    const rms = robustLimits(this.rms, this.channels);
    return {
      source: 'session-baseline', windows: this.pp.length, medianPeakToPeakUv: pp.median, madPeakToPeakUv: pp.mad,
      peakToPeakLimitUv: pp.limit, rmsLimitUv: rms.limit, final: this.done,
    };
  }
}
