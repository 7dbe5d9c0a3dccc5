/**
 * The seeded demo decoder: a training job that simulates one calibration run of the demo
 * participant (simulator/profiles/demo-hand-imagery.json, invented data), stores it as a
 * 'simulated' recording, trains the demo study's recipe on the stored recording and freezes the
 * result (source 'demo'). Deterministic: fixed simulation seed and training seed.
 */
import { readFileSync } from 'node:fs';
import type { Recipe } from '../../shared/api/studies';
import type { DemoDecoderSize } from '../config';
import type { TrainTask } from './protocol';

export const DEMO_DECODER_NAME = 'Demo hand-imagery decoder';

/** Stored parameters of the demo job (training_jobs.params). */
export interface DemoParams {
  /** File name (without .json) under simulator/profiles/. */
  profile: string;
  /**
   * Seed of the simulated calibration run. Not the profile's own seed, so a live demo session
   * (embedded bridge, profile seed) runs on data the decoder has never seen.
   */
  simulationSeed: number;
  /** Overrides the profile's trials per class (a shorter calibration run trains faster). */
  trialsPerClass?: number;
  recipe?: Recipe;
  folds: number;
  inner: number;
  seed: number;
  /** ICA components kept (component-tf). */
  components?: number;
  /** Set once the simulated recording is stored. */
  recordingIds?: number[];
}

/**
 * Parameters of the demo job queued on first start. Sized so the decoder is frozen about a
 * minute after first start on a 2-core machine (measured: about 40 s of CPU for the fit):
 * 40 cues per class, 3 outer and 3 inner folds, 10 ICA components. On the simulated data this
 * gave a nested-CV accuracy of 0.85 (CSP + LDA baseline 0.78).
 */
export function demoDecoderParams(size: DemoDecoderSize = {}): DemoParams {
  return { profile: 'demo-hand-imagery', simulationSeed: 7, trialsPerClass: 40, folds: 3, inner: 3, seed: 1, components: 10, ...size };
}

function loadProfile(name: string, trialsPerClass: number | undefined): unknown {
  if (!/^[a-z0-9-]+$/.test(name)) throw new Error(`not a profile name: '${name}'`);
  const url = new URL(`../../simulator/profiles/${name}.json`, import.meta.url);
  const profile = JSON.parse(readFileSync(url, 'utf8')) as Record<string, unknown>;
  return trialsPerClass === undefined ? profile : { ...profile, trialsPerClass };
}

/** The worker task of a demo job for its study. */
export function demoTask(p: DemoParams, study: {
  cueClasses: string[]; channelNames: string[]; sampleRateHz: number; epochStartS: number; epochEndS: number;
  powerLineHz: 50 | 60; recipe: Recipe;
}): TrainTask {
  return {
    kind: 'simulate-and-train', profile: loadProfile(p.profile, p.trialsPerClass), simulationSeed: p.simulationSeed,
    options: {
      recipe: p.recipe ?? study.recipe, classes: study.cueClasses, annotationClasses: study.cueClasses,
      channelNames: study.channelNames, sampleRateHz: study.sampleRateHz, epochStartS: study.epochStartS,
      epochEndS: study.epochEndS, powerLineHz: study.powerLineHz, folds: p.folds, inner: p.inner, seed: p.seed,
      ...(p.components !== undefined ? { components: p.components } : {}),
    },
  };
}
