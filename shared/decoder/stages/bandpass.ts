/**
 * Butterworth band-pass for decoding (shared/dsp/butter.ts design, SciPy-equivalent SOS).
 *
 * `bandpassStage` filters each epoch on its own, causally from zero state (shared/dsp/sosfilt),
 * exactly what a live decoder can do with one epoch; the first samples carry the filter's
 * start-up transient, so prefer a window that starts well after the epoch does, or filter the
 * continuous recording before epoching with `filterRecording` (what the reference protocol in
 * ../shared/data/eegmmidb/REFERENCE-ACCURACY.md does). A fixed filter is label-free, so filtering
 * the whole recording before cross-validation leaks nothing (REFERENCES.md §6 table).
 */
import { butterSos, type Sos } from '../../dsp/butter';
import { sosfilt, sosfiltfilt } from '../../dsp/sosfilt';
import { ParamError, ShapeError, type Epochs, type Recording } from '../../types';
import { checkEpochs } from '../epochs';
import {
  expectArtifact, numberField, registerStageKind, type Fitted, type Stage, type StageArtifact,
} from '../pipeline';

export type BandpassParams = {
  /** Butterworth order of the low-pass prototype (band-pass has 2·order poles). */
  order: number;
  lowHz: number;
  highHz: number;
  sampleRateHz: number;
};

/** The band-pass design for the params (one SOS row per section). */
export function bandpassSos(p: BandpassParams): Sos {
  return butterSos(p.order, [p.lowHz, p.highHz], 'bandpass', p.sampleRateHz);
}

function makeFitted(params: BandpassParams, sos: Sos): Fitted<Epochs, Epochs> {
  return {
    kind: 'bandpass',
    transform: (x) => { checkEpochs(x); return x.map((trial) => sosfilt(sos, trial)); },
    toArtifact: () => ({ kind: 'bandpass', version: 1, params: { ...params }, learned: { sos: sos.map((r) => [...r]) } }),
  };
}

/**
 * Stage: causal Butterworth band-pass of each epoch (fresh zero state per epoch). Stateless:
 * fit returns the fixed filter; the artifact stores the SOS coefficients.
 */
export function bandpassStage(params: BandpassParams): Stage<Epochs, Epochs> {
  const sos = bandpassSos(params);
  const fitted = makeFitted({ ...params }, sos);
  return { kind: 'bandpass', params: { ...params }, fit: () => fitted };
}

/** Rebuilds the stage from its artifact, using the stored coefficients. */
export function bandpassFromArtifact(a: StageArtifact): Fitted<Epochs, Epochs> {
  expectArtifact(a, 'bandpass', 1);
  const params: BandpassParams = {
    order: numberField(a.params, 'order', 'params'), lowHz: numberField(a.params, 'lowHz', 'params'),
    highHz: numberField(a.params, 'highHz', 'params'), sampleRateHz: numberField(a.params, 'sampleRateHz', 'params'),
  };
  const rows = a.learned.sos;
  if (!Array.isArray(rows) || !rows.every((r: unknown) => Array.isArray(r) && r.every((v: unknown) => typeof v === 'number'))) {
    throw new ShapeError('learned.sos', 'expected an array of numeric rows');
  }
  return makeFitted(params, rows as Sos);
}

registerStageKind('bandpass', bandpassFromArtifact);

/**
 * Band-passes a continuous recording before epoching.
 * @param zeroPhase false (default): causal, as online; true: forward-backward (sosfiltfilt,
 *   SciPy's default padding) for offline analysis only, matching the reference protocol's
 *   zero-phase filtering. The recording is not modified; annotations are shared.
 */
export function filterRecording(rec: Recording, params: Omit<BandpassParams, 'sampleRateHz'>,
                                zeroPhase = false): Recording {
  if (!(rec.sampleRateHz > 0)) throw new ParamError('rec.sampleRateHz', `expected > 0, got ${rec.sampleRateHz}`);
  const sos = bandpassSos({ ...params, sampleRateHz: rec.sampleRateHz });
  return { ...rec, data: zeroPhase ? sosfiltfilt(sos, rec.data) : sosfilt(sos, rec.data) };
}
