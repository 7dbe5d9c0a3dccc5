import { describe, expect, it } from 'vitest';
import { simulateRecording } from '../../simulator/offline';
import { busyProfile } from './fixtures';

/** Artifacts of the participant's own making (blinks, saccades, muscle) that overlap a cue's epoch. */
function inEpochs(still: boolean): { overlapping: number; total: number; pops: number } {
  // Cues 7-8 s apart as in the demo (gaps of 2.5-3.5 s between 4.5-s epochs: every artifact fits in one).
  const p = busyProfile({ trialsPerClass: 12, cueIntervalS: [7, 8] });
  const { truth } = simulateRecording({ ...p, artifacts: { ...p.artifacts, stillDuringEpochs: still } }, { seconds: 150 });
  const own = truth.artifacts.filter((a) => a.kind === 'blink' || a.kind === 'saccade' || a.kind === 'muscle');
  const overlapping = own.filter((a) => truth.cues.some((c) => a.startS < c.timeS + p.epoch.tmaxS && a.startS + a.durationS > c.timeS + p.epoch.tminS));
  return { overlapping: overlapping.length, total: own.length, pops: truth.artifacts.filter((a) => a.kind === 'pop').length };
}

describe('a participant who keeps still during trials (artifacts.stillDuringEpochs)', () => {
  const free = inEpochs(false);
  const still = inEpochs(true);

  it('defers every blink, saccade and muscle burst out of the epochs, keeping them', () => {
    // Source: the profile's definition (docs/simulation-profile.md): none overlaps an epoch when set.
    expect(still.overlapping).toBe(0);
    // Same source, the default: with epochs covering 4.5 of every 7-8 s, most artifacts touch one.
    expect(free.overlapping).toBeGreaterThan(free.total / 2);
    // Deferral moves events, it does not drop them: about the same number within the 150 s
    // (a few pushed past the end; common practice: a Poisson count near 170 varies by ±3·sqrt(170) ≈ ±40).
    expect(Math.abs(still.total - free.total)).toBeLessThan(40);
    // Pops are not the participant's doing and are not deferred (same random stream, same count).
    expect(still.pops).toBe(free.pops);
  });
});
