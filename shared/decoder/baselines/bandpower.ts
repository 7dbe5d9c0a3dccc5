/**
 * Log band power features: per trial, channel and band, log of the power in the band from a
 * Welch PSD (Welch 1967; shared/tf/welch.ts: periodic Hann window, mean detrend, density
 * scaling, as scipy.signal.welch). Band power = Σ psd[k]·Δf over bins with low <= f_k < high
 * (Δf = fs / segment length; half-open so adjacent bands such as 8-13 and 13-30 Hz share no
 * bin), in µV² for µV input. Stateless: nothing is learned, fit returns the stage itself.
 * Common practice, not from a cited source: 1 s segments with 50 % overlap by default
 * (1 Hz resolution; shortened to the epoch length if the epoch is shorter), and power floored
 * at 1e-300 so a flat channel gives a large negative feature rather than -Infinity.
 * Feature order: channel-major, [ch0 band0, ch0 band1, ..., ch1 band0, ...].
 */
import { welchPsd } from '../../tf/welch';
import { ParamError, type Epochs } from '../../types';
import { checkEpochs } from '../epochs';
import {
  expectArtifact, numberField, registerStageKind,
  type FeatureRows, type Fitted, type Stage, type StageArtifact,
} from '../pipeline';

export type BandPowerParams = {
  sampleRateHz: number;
  /** Bands [lowHz, highHz), default [[8, 13], [13, 30]]. */
  bandsHz?: [number, number][];
  /** Welch segment length in samples (default round(sampleRateHz), i.e. 1 s). */
  segmentLength?: number;
  /** Samples shared by consecutive segments (default half the segment). */
  overlap?: number;
};

type FullParams = { sampleRateHz: number; bandsHz: [number, number][]; segmentLength: number; overlap: number | null };

function checkParams(p: BandPowerParams): FullParams {
  if (!(Number.isFinite(p.sampleRateHz) && p.sampleRateHz > 0)) {
    throw new ParamError('sampleRateHz', `expected a positive number, got ${p.sampleRateHz}`);
  }
  const bandsHz = (p.bandsHz ?? [[8, 13], [13, 30]]).map(([lo, hi]) => [lo, hi] as [number, number]);
  if (bandsHz.length === 0) throw new ParamError('bandsHz', 'expected at least one band');
  bandsHz.forEach(([lo, hi], i) => {
    if (!(lo >= 0 && hi > lo && hi <= p.sampleRateHz / 2)) {
      throw new ParamError(`bandsHz[${i}]`, `expected 0 <= low < high <= ${p.sampleRateHz / 2} Hz, got [${lo}, ${hi}]`);
    }
  });
  const segmentLength = p.segmentLength ?? Math.round(p.sampleRateHz);
  if (!Number.isInteger(segmentLength) || segmentLength < 2) {
    throw new ParamError('segmentLength', `expected an integer >= 2, got ${segmentLength}`);
  }
  return { sampleRateHz: p.sampleRateHz, bandsHz, segmentLength, overlap: p.overlap ?? null };
}

/**
 * Log band power of every trial, channel and band (module comment for the definition).
 * @param epochs [trial][channel][sample], µV
 * @returns [trial][channel·bands + band], natural log of µV²
 */
export function logBandPower(epochs: Epochs, params: BandPowerParams): FeatureRows {
  const p = checkParams(params);
  const { samples } = checkEpochs(epochs);
  const seg = Math.min(p.segmentLength, samples);
  const overlap = p.overlap ?? Math.floor(seg / 2);
  const df = p.sampleRateHz / seg;
  return epochs.map((trial) => {
    const out = new Float64Array(trial.length * p.bandsHz.length);
    trial.forEach((ch, c) => {
      const { frequenciesHz, psd } = welchPsd(ch, p.sampleRateHz, { segmentLength: seg, overlap });
      p.bandsHz.forEach(([lo, hi], b) => {
        let power = 0;
        for (let k = 0; k < psd.length; k++) if (frequenciesHz[k]! >= lo && frequenciesHz[k]! < hi) power += psd[k]! * df;
        out[c * p.bandsHz.length + b] = Math.log(Math.max(power, 1e-300));
      });
    });
    return out;
  });
}

/** Stage: log band power (stateless; fit returns a fitted object that only holds the params). */
export function bandPowerStage(params: BandPowerParams): Stage<Epochs, FeatureRows> {
  const full = checkParams(params);
  const fitted: Fitted<Epochs, FeatureRows> = {
    kind: 'log-bandpower',
    transform: (x) => logBandPower(x, toParams(full)),
    toArtifact: () => ({ kind: 'log-bandpower', version: 1, params: { ...full }, learned: {} }),
  };
  return { kind: 'log-bandpower', params: full, fit: () => fitted };
}

function toParams(f: FullParams): BandPowerParams {
  return { sampleRateHz: f.sampleRateHz, bandsHz: f.bandsHz, segmentLength: f.segmentLength,
           ...(f.overlap === null ? {} : { overlap: f.overlap }) };
}

/** Rebuilds the stage from its artifact. */
export function bandPowerFromArtifact(a: StageArtifact): Fitted<Epochs, FeatureRows> {
  expectArtifact(a, 'log-bandpower', 1);
  const bands = a.params.bandsHz;
  if (!Array.isArray(bands)) throw new ParamError('params.bandsHz', 'expected an array of [low, high]');
  const bandsHz = bands.map((b: unknown, i) => {
    if (!Array.isArray(b) || b.length !== 2 || typeof b[0] !== 'number' || typeof b[1] !== 'number') {
      throw new ParamError(`params.bandsHz[${i}]`, 'expected [low, high] in Hz');
    }
    return [b[0], b[1]] as [number, number];
  });
  const overlap = a.params.overlap;
  return bandPowerStage({
    sampleRateHz: numberField(a.params, 'sampleRateHz', 'params'), bandsHz,
    segmentLength: numberField(a.params, 'segmentLength', 'params'),
    ...(typeof overlap === 'number' ? { overlap } : {}),
  }).fit([]);
}

registerStageKind('log-bandpower', bandPowerFromArtifact);
