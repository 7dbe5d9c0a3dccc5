/**
 * The simulation profile: a synthetic participant and session, as JSON. Parsed strictly: an
 * unknown field, a wrong type or an out-of-range value is refused with the field's name.
 * Every field is documented in docs/simulation-profile.md.
 */
import { z } from 'zod';
import { positionOf } from '../shared/montage';
import { ParamError } from '../shared/types';

const label = z.string().min(1).max(64).regex(/^[^\u0000-\u001f\u007f]+$/, 'no control characters');
const electrode = z.string().min(1).refine((n) => positionOf(n) !== undefined, 'not a 10-10 position known to shared/montage');
const rate = z.number().finite().min(0).max(600);

const rhythmSchema = z.strictObject({
  name: label,
  nearChannel: electrode,
  frequencyHz: z.number().finite().positive(),
  bandwidthHz: z.number().finite().positive(),
  /** RMS at the source's scalp centre, µV. */
  rmsUv: z.number().finite().min(0),
  spreadDeg: z.number().finite().min(5).max(90).default(25),
});

const effectSchema = z.strictObject({
  class: label,
  nearChannel: electrode,
  frequencyHz: z.number().finite().positive(),
  bandwidthHz: z.number().finite().positive(),
  onsetS: z.number().finite(),
  durationS: z.number().finite().positive(),
  changePercent: z.number().finite().gt(-100).max(1000),
});

const range = (lo: number, hi: number) => z.tuple([z.number().finite().min(lo).max(hi), z.number().finite().min(lo).max(hi)])
  .refine(([a, b]) => a <= b, 'expected [min, max] with min <= max');

const artifactsSchema = z.strictObject({
  blinksPerMin: rate,
  muscleBurstsPerMin: rate,
  mainsHz: z.number().finite().min(0),
  /** Peak amplitude of the mains sinusoid at a channel of average pickup, µV. */
  mainsMicrovolts: z.number().finite().min(0),
  dropoutsPerMin: rate,
  saccadesPerMin: rate.default(0),
  popsPerMin: rate.default(0),
  flatChannels: z.array(z.string().min(1)).default([]),
  blinkAmplitudeUv: range(0, 2000).default([60, 180]),
  blinkDurationS: range(0.05, 2).default([0.25, 0.4]),
  saccadeAmplitudeUv: range(0, 500).default([20, 60]),
  muscleRmsUv: range(0, 500).default([8, 30]),
  popAmplitudeUv: range(0, 5000).default([50, 250]),
  dropoutDurationS: range(0.001, 60).default([0.05, 0.5]),
  /**
   * A participant told to keep still during each trial: a blink, saccade or muscle burst that
   * would overlap a cue's epoch is deferred to the epoch's end (pops, dropouts and mains are not).
   */
  stillDuringEpochs: z.boolean().default(false),
});

const backgroundSchema = z.strictObject({
  /** chi of the 1/f^chi power spectrum. */
  exponent: z.number().finite().min(0.3).max(2),
  /** RMS of the background at an average channel, µV. */
  rmsUv: z.number().finite().min(0),
  sourceCount: z.int().min(1).max(256),
  spreadDeg: z.number().finite().min(5).max(90),
  /** Independent white noise per channel (amplifier and electrode), RMS µV. */
  sensorNoiseUv: z.number().finite().min(0),
});

/** Defaults for the optional `background` block. */
export const DEFAULT_BACKGROUND = Object.freeze({ exponent: 1.5, rmsUv: 8, sourceCount: 24, spreadDeg: 30, sensorNoiseUv: 1 });

/** Defaults for the optional `rhythms` list: occipital alpha, sensorimotor mu and beta, frontal midline theta. */
export const DEFAULT_RHYTHMS: readonly RhythmSpec[] = Object.freeze([
  { name: 'alpha', nearChannel: 'Oz', frequencyHz: 10, bandwidthHz: 1.5, rmsUv: 10, spreadDeg: 35 },
  { name: 'mu-left', nearChannel: 'C3', frequencyHz: 11, bandwidthHz: 1.5, rmsUv: 7, spreadDeg: 22 },
  { name: 'mu-right', nearChannel: 'C4', frequencyHz: 11, bandwidthHz: 1.5, rmsUv: 7, spreadDeg: 22 },
  { name: 'beta-left', nearChannel: 'C3', frequencyHz: 21, bandwidthHz: 4, rmsUv: 3, spreadDeg: 22 },
  { name: 'beta-right', nearChannel: 'C4', frequencyHz: 21, bandwidthHz: 4, rmsUv: 3, spreadDeg: 22 },
  { name: 'theta', nearChannel: 'Fz', frequencyHz: 6, bandwidthHz: 1.5, rmsUv: 4, spreadDeg: 30 },
]);

const profileSchema = z.strictObject({
  name: z.string().max(200).optional(),
  description: z.string().max(2000).optional(),
  sampleRateHz: z.number().finite().min(16).max(20_000),
  channels: z.array(electrode).min(1).max(512),
  classes: z.array(label).min(1).max(32),
  trialsPerClass: z.int().min(1).max(100_000),
  cueIntervalS: range(0.1, 3600),
  leadInS: z.number().finite().min(0).max(600).default(3),
  epoch: z.strictObject({ tminS: z.number().finite(), tmaxS: z.number().finite() }),
  background: backgroundSchema.default({ ...DEFAULT_BACKGROUND }),
  rhythms: z.array(rhythmSchema).max(64).default(DEFAULT_RHYTHMS.map((r) => ({ ...r }))),
  effects: z.array(effectSchema).max(256),
  artifacts: artifactsSchema,
  seed: z.int().min(0).max(0xffff_ffff),
});

export type SimulationProfile = z.infer<typeof profileSchema>;
export type RhythmSpec = z.infer<typeof rhythmSchema>;
export type EffectSpec = z.infer<typeof effectSchema>;
export type ArtifactSpec = z.infer<typeof artifactsSchema>;
/** The profile as written in JSON, before defaults are filled in. */
export type SimulationProfileInput = z.input<typeof profileSchema>;

/** A refused profile; `field` is the first offending field, `issues` lists them all. */
export class ProfileError extends ParamError {
  constructor(readonly issues: Array<{ field: string; message: string }>) {
    super(issues[0]?.field ?? 'profile', issues.map((i) => `${i.field}: ${i.message}`).join('; '));
    this.name = 'ProfileError';
  }
}

function crossChecks(p: SimulationProfile): Array<{ field: string; message: string }> {
  const out: Array<{ field: string; message: string }> = [];
  const nyquist = p.sampleRateHz / 2;
  const names = p.channels.map((c) => positionOf(c)!.name);
  names.forEach((n, i) => { if (names.indexOf(n) !== i) out.push({ field: `channels.${i}`, message: `duplicate channel '${p.channels[i]}'` }); });
  p.classes.forEach((c, i) => { if (p.classes.indexOf(c) !== i) out.push({ field: `classes.${i}`, message: `duplicate class '${c}'` }); });
  const { tminS, tmaxS } = p.epoch;
  if (!(tminS < tmaxS)) out.push({ field: 'epoch.tmaxS', message: 'expected tminS < tmaxS' });
  if (p.cueIntervalS[0] < tmaxS - tminS) {
    out.push({ field: 'cueIntervalS', message: `the shortest interval ${p.cueIntervalS[0]} s is shorter than the epoch (${tmaxS - tminS} s): epochs would overlap` });
  }
  if (p.leadInS < -tminS) out.push({ field: 'leadInS', message: `must be at least -epoch.tminS (${-tminS} s) so the first epoch is complete` });
  p.effects.forEach((e, i) => {
    if (!p.classes.includes(e.class)) out.push({ field: `effects.${i}.class`, message: `'${e.class}' is not one of classes` });
    if (e.frequencyHz + e.bandwidthHz / 2 >= nyquist) out.push({ field: `effects.${i}.frequencyHz`, message: `band reaches Nyquist (${nyquist} Hz)` });
  });
  p.rhythms.forEach((r, i) => {
    if (r.frequencyHz + r.bandwidthHz / 2 >= nyquist) out.push({ field: `rhythms.${i}.frequencyHz`, message: `band reaches Nyquist (${nyquist} Hz)` });
  });
  if (p.artifacts.mainsHz >= nyquist) out.push({ field: 'artifacts.mainsHz', message: `must be below Nyquist (${nyquist} Hz)` });
  p.artifacts.flatChannels.forEach((c, i) => {
    const pos = positionOf(c);
    if (!pos || !names.includes(pos.name)) out.push({ field: `artifacts.flatChannels.${i}`, message: `'${c}' is not one of channels` });
  });
  return out;
}

/**
 * Validates a profile (parsed JSON) and fills in defaults.
 * @throws ProfileError naming every offending field (e.g. 'artifacts.blinksPerMin', 'effects.0.class')
 */
export function parseProfile(input: unknown): SimulationProfile {
  const r = profileSchema.safeParse(input);
  if (!r.success) {
    throw new ProfileError(r.error.issues.map((i) => {
      const path = i.path.map(String).join('.');
      const keys = i.code === 'unrecognized_keys' ? i.keys : [];
      return keys.length > 0
        ? { field: keys.map((k) => (path ? `${path}.${k}` : k)).join(', '), message: 'unknown field' }
        : { field: path || 'profile', message: i.message };
    }));
  }
  const issues = crossChecks(r.data);
  if (issues.length > 0) throw new ProfileError(issues);
  return r.data;
}
