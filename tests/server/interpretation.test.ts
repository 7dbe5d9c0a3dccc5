import { describe, expect, it } from 'vitest';
import { interpretArtifact } from '../../server/workers/artifact';
import { interpretDecoder } from '../../shared/decoder/interpret';
import { fittedDecoder } from '../fixtures/decoder/fitted';

describe('the stored interpretation of a component-tf decoder', () => {
  const { artifact } = fittedDecoder('component-tf');
  const own = interpretDecoder(artifact, Number.POSITIVE_INFINITY);
  const comps = own.recipe === 'component-tf' ? own.components : [];

  it('shows the weights\' profiles when no training report came with the artifact', () => {
    const i = interpretArtifact(artifact, null);
    // Source: shared/api/decoders.ts (profileSource) and interpret.ts (the weights' leading singular vectors).
    expect(i.components?.map((c) => c.profileSource)).toEqual(comps.map(() => 'weights'));
    expect(i.components?.map((c) => c.peakFrequencyHz)).toEqual(comps.map((c) => c.weightPeakFrequencyHz));
  });

  it('takes each selected component\'s activation pattern from the training report, and only a well-formed one', () => {
    expect(comps.length).toBeGreaterThan(0);
    const first = comps[0]!;
    const pattern = { index: first.component, peakSource: 'activation-pattern', peakFrequencyHz: 11.5, peakTimeS: 1.25,
      frequencyProfile: first.frequenciesHz.map((_, j) => j), timeCourse: first.timesS.map((_, j) => -j) };
    const report = { selectedComponents: [pattern, ...comps.slice(1).map((c) => ({ ...pattern, index: c.component, timeCourse: [1] }))] };
    const i = interpretArtifact(artifact, report);
    const shown = i.components!.find((c) => c.index === first.component)!;
    // Source: shared/api/decoders.ts contract: the report's pattern replaces the profiles and peaks.
    expect([shown.profileSource, shown.peakFrequencyHz, shown.peakTimeS]).toEqual(['activation-pattern', 11.5, 1.25]);
    expect(shown.frequencyProfile).toEqual(pattern.frequencyProfile);
    // Same source: a pattern whose time course does not fit the weight grid is not used.
    expect(i.components!.filter((c) => c.index !== first.component).every((c) => c.profileSource === 'weights')).toBe(true);
  });
});
