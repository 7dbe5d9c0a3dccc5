import { describe, expect, it } from 'vitest';
import { COMMON_32 } from '../../shared/montage';
import { parseProfile, ProfileError } from '../../simulator/profile';
import { busyProfile, demoProfile } from './fixtures';

function refusal(input: unknown): ProfileError {
  try {
    parseProfile(input);
  } catch (e) {
    if (e instanceof ProfileError) return e;
    throw e;
  }
  throw new Error('profile accepted');
}

describe('simulation profiles', () => {
  it('accepts the shipped demo: two hand-imagery classes, the 32-channel subset, 250 Hz, 100 trials each', () => {
    const p = parseProfile(demoProfile());
    // Issue 5 part 2 (the demo scenario) and REFERENCES.md §8 ("in 32" column) for the channel set.
    expect(p.classes).toEqual(['left-hand', 'right-hand']);
    expect([...p.channels].sort()).toEqual([...COMMON_32].sort());
    expect(p.sampleRateHz).toBe(250);
    expect(p.trialsPerClass).toBe(100);
    // Pfurtscheller & Lopes da Silva 1999: left-hand imagery -> mu ERD at C4 (contralateral).
    expect(p.effects.some((e) => e.class === 'left-hand' && e.nearChannel === 'C4' && e.changePercent < 0)).toBe(true);
    expect(p.effects.some((e) => e.class === 'right-hand' && e.nearChannel === 'C3' && e.changePercent < 0)).toBe(true);
    expect(p.artifacts.mainsHz).toBe(50);
  });

  it('fills defaults for the optional blocks', () => {
    const p = parseProfile(busyProfile());
    // docs/simulation-profile.md (defaults table).
    expect(p.background.exponent).toBe(1.5);
    expect(p.rhythms.map((r) => r.name)).toEqual(['alpha', 'mu-left', 'mu-right', 'beta-left', 'beta-right', 'theta']);
    expect(p.artifacts.blinkAmplitudeUv).toEqual([60, 180]);
  });

  it('refuses an unknown field, naming it', () => {
    const e = refusal({ ...busyProfile(), artifacts: { ...busyProfile().artifacts, blinkRate: 3 } });
    // docs/simulation-profile.md: unknown fields are refused with their name.
    expect(e.field).toBe('artifacts.blinkRate');
    expect(e.message).toMatch(/unknown field/);
    expect(refusal({ ...busyProfile(), colour: 'blue' }).field).toBe('colour');
  });

  it('refuses an ill-typed field, naming it', () => {
    // docs/simulation-profile.md: ill-typed fields are refused with their name.
    expect(refusal({ ...busyProfile(), sampleRateHz: '250' }).field).toBe('sampleRateHz');
    expect(refusal({ ...busyProfile(), trialsPerClass: 2.5 }).field).toBe('trialsPerClass');
    const effects = [{ ...busyProfile().effects![0]!, changePercent: -120 }];
    expect(refusal({ ...busyProfile(), effects }).field).toBe('effects.0.changePercent');
    expect(refusal({ ...busyProfile(), cueIntervalS: [6, 5] }).field).toBe('cueIntervalS');
  });

  it('refuses names that are not 10-10 positions and values that do not fit together', () => {
    expect(refusal({ ...busyProfile(), channels: ['C3', 'X9'] }).field).toBe('channels.1');
    const effects = [{ ...busyProfile().effects![0]!, class: 'feet' }];
    expect(refusal({ ...busyProfile(), effects }).field).toBe('effects.0.class');
    expect(refusal({ ...busyProfile(), artifacts: { ...busyProfile().artifacts, flatChannels: ['Pz'] } }).field).toBe('artifacts.flatChannels.0');
    // Nyquist: a 60 Hz line cannot be sampled at 100 Hz.
    expect(refusal({ ...busyProfile(), sampleRateHz: 100 }).field).toBe('artifacts.mainsHz');
    expect(refusal({ ...busyProfile(), cueIntervalS: [2, 3] }).field).toBe('cueIntervalS');
    expect(refusal({ ...busyProfile(), channels: ['C3', 'c3'] }).field).toBe('channels.1');
  });
});
