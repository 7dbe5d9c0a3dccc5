/**
 * Cone of influence of a Morlet CWT plan (Torrence & Compo 1998, Bull Am Meteorol Soc
 * 79(1):61-78, Table 1 and §3g [section letter from memory]): the wavelet power of an edge
 * discontinuity falls by e⁻² (the e-folding time) within √2·s of a record end; for the
 * n-cycle wavelet s = σ_t = n/(2πf) (Tallon-Baudry et al. 1997, J Neurosci 17(2):722-734). The distance of sample i to the nearest end is
 * min(i, N − 1 − i)/fs, as in T&C's own code. The same cone is reported for 'zero' and
 * 'reflect' padding: reflection reduces, but does not remove, edge effects.
 */
import type { MorletPlan } from './morlet-plan';

/**
 * The T&C cone-of-influence curve on the plan's output grid, expressed as the widest wavelet
 * envelope SD not affected by the edges: σ_max(t) = d(t)/√2 s, where d(t) is the distance to the
 * nearest record end (s). A value at frequency row j and column t is edge-affected when
 * plan.sigmaTS[j] > σ_max(t); for a constant cycle count n the boundary frequency is
 * f_coi(t) = n/(2π σ_max(t)) Hz.
 * @returns [nTimes] σ_max in seconds
 */
export function coneOfInfluence(plan: MorletPlan): Float64Array {
  const out = new Float64Array(plan.nTimes);
  for (let t = 0; t < plan.nTimes; t++) out[t] = edgeDistanceS(plan, t) / Math.SQRT2;
  return out;
}

/**
 * Per-(frequency, time) edge mask: 1 where the e-folding time √2·σ_t of row j exceeds the
 * distance of column t to the nearest record end (inside the cone of influence), else 0.
 * @returns [nFrequencies][nTimes] flattened frequency-major, like `cwtPower`
 */
export function edgeMask(plan: MorletPlan): Uint8Array {
  const nT = plan.nTimes;
  const out = new Uint8Array(plan.nFrequencies * nT);
  for (let j = 0; j < plan.nFrequencies; j++) {
    const eFoldingS = Math.SQRT2 * plan.sigmaTS[j]!;
    for (let t = 0; t < nT; t++) out[j * nT + t] = eFoldingS > edgeDistanceS(plan, t) ? 1 : 0;
  }
  return out;
}

function edgeDistanceS(plan: MorletPlan, t: number): number {
  const i = plan.outputSamples[t]!;
  return Math.min(i, plan.nSamples - 1 - i) / plan.sampleRateHz;
}
