import { MONTAGE_1010, COMMON_32 } from '@shared/montage';
import type { CreateStudyRequest, Recipe, Study } from '@shared/api/studies';

/** What the study form edits; numbers may be empty (null) while the user types. */
export interface StudyFormModel {
  name: string;
  description: string;
  ethicsReference: string;
  cueClasses: string[];
  epochStartS: number | null;
  epochEndS: number | null;
  channelNames: string[];
  sampleRateHz: number | null;
  powerLineHz: 50 | 60;
  recipe: Recipe;
}

/**
 * Starting values for a new study. Common practice, not from a cited source: an epoch from the
 * cue to 4 s after it and a 160 Hz rate, as in the PhysioNet motor-imagery runs; mains 50 Hz.
 */
export function emptyStudyForm(): StudyFormModel {
  return {
    name: '',
    description: '',
    ethicsReference: '',
    cueClasses: [],
    epochStartS: 0,
    epochEndS: 4,
    channelNames: [],
    sampleRateHz: 160,
    powerLineHz: 50,
    recipe: 'component-tf',
  };
}

export function studyToForm(s: Study): StudyFormModel {
  return {
    name: s.name,
    description: s.description,
    ethicsReference: s.ethicsReference,
    cueClasses: [...s.cueClasses],
    epochStartS: s.epochStartS,
    epochEndS: s.epochEndS,
    channelNames: [...s.channelNames],
    sampleRateHz: s.sampleRateHz,
    powerLineHz: s.powerLineHz,
    recipe: s.recipe,
  };
}

/** The request body; empty numbers go as null so the shared schema names the field. */
export function formToRequest(m: StudyFormModel): Record<keyof CreateStudyRequest, unknown> {
  return {
    name: m.name,
    description: m.description,
    ethicsReference: m.ethicsReference,
    cueClasses: m.cueClasses,
    epochStartS: m.epochStartS,
    epochEndS: m.epochEndS,
    channelNames: m.channelNames,
    sampleRateHz: m.sampleRateHz,
    powerLineHz: m.powerLineHz,
    recipe: m.recipe,
  };
}

/** Channel presets: the 64 channels of the PhysioNet eegmmidb recordings (file order) and a common 32 subset. */
export const CHANNEL_PRESETS: { label: string; names: readonly string[] }[] = [
  { label: '64 (eegmmidb)', names: MONTAGE_1010.slice(0, 64).map((p) => p.name) },
  { label: 'Common 32', names: COMMON_32 },
];

export const RECIPE_INFO: Record<Recipe, { label: string; text: string }> = {
  'component-tf': {
    label: 'Component time-frequency',
    text: 'ICA components, Morlet time-frequency power, trace-norm logistic regression. Interpretable: each kept component reads as a frequency profile and a time course.',
  },
  covariance: {
    label: 'Spatial covariance',
    text: 'Each trial’s band-passed covariance with the same trace-norm engine. Far fewer parameters; holds up better with tens of calibration trials.',
  },
};
