/**
 * Solver timings (STYLE.md §9: speed is measured by a script, never by a timed test).
 * Run: npx tsx bench/solver.ts
 *  1. ICA: 64 channels × 40 000 samples (250 s at 160 Hz) → 15 components, both methods.
 *  2. Trace-norm logistic regression: 45 trials, 15 blocks of 16×18, a 10-value λ path, with a
 *     strong planted rank-1 effect (two blocks active throughout) and a weak one (below what 45
 *     trials can detect, so noise blocks enter: 3 to 8 active blocks, the costlier case).
 *  3. The covariance recipe's shape: 36 trials (an inner training fold), one symmetric 64×64 block
 *     (random symmetric matrices with a planted rank-2 class effect), the λ path from λ_max to
 *     λ_max/100, solved with the symmetric prox (eigenvalue soft-thresholding) and, for
 *     comparison, with the block left unflagged (Jacobi SVD prox).
 * The data are synthetic (seeded), shaped like the decoder's real inputs. Wall times depend on
 * what else runs on the machine; CPU times are printed beside them.
 */
import { createRng } from '../shared/linalg/random';
import { fitIca } from '../shared/ica/ica';
import { amariIndex } from '../shared/ica/amari';
import { traceNormPath } from '../shared/decoder/tracenorm-path';
import type { MatrixFeatures } from '../shared/decoder/tracenorm';

function icaProblem(channels: number, samples: number, sources: number, seed: number) {
  const rng = createRng(seed);
  const s = Array.from({ length: sources }, (_, j) => {
    const row = new Float64Array(samples);
    for (let t = 0; t < samples; t++) {
      if (j % 3 === 0) row[t] = Math.log(rng.nextFloat() / rng.nextFloat()); // Laplacian (super-Gaussian)
      else if (j % 3 === 1) row[t] = Math.sin(2 * Math.PI * (3 + j) * t / 160 + j); // sinusoid (sub-Gaussian)
      else row[t] = 2 * rng.nextFloat() - 1; // uniform (sub-Gaussian)
    }
    return row;
  });
  const a = Float64Array.from({ length: channels * sources }, () => rng.nextNormal());
  const x = Array.from({ length: channels }, (_, c) => {
    const row = new Float64Array(samples);
    for (let t = 0; t < samples; t++) {
      let acc = 0.05 * rng.nextNormal();
      for (let j = 0; j < sources; j++) acc += a[c * sources + j]! * s[j]![t]!;
      row[t] = acc;
    }
    return row;
  });
  return { x, a };
}

function traceNormProblem(nTrials: number, nBlocks: number, rows: number, cols: number, seed: number, effect: number) {
  const rng = createRng(seed);
  const dim = nBlocks * rows * cols;
  const labels = Uint8Array.from({ length: nTrials }, (_, i) => i % 2);
  const x = Float64Array.from({ length: nTrials * dim }, () => rng.nextNormal());
  // Planted rank-1 class effect in blocks 2 and 7 (a frequency band × a time window).
  for (let i = 0; i < nTrials; i++) {
    const sgn = labels[i] === 1 ? effect : -effect;
    for (const k of [2, 7]) {
      for (let r = 4; r < 8; r++) for (let c = 6; c < 12; c++) x[i * dim + k * rows * cols + r * cols + c]! += sgn;
    }
  }
  const features: MatrixFeatures = { nTrials, blocks: Array.from({ length: nBlocks }, () => ({ rows, cols })), x };
  return { features, labels };
}

/** Wall-clock and CPU seconds of f (CPU time is steadier when other processes share the cores). */
function time<T>(f: () => T): [T, number, number] {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const r = f();
  const c = process.cpuUsage(c0);
  return [r, (performance.now() - t0) / 1000, (c.user + c.system) / 1e6];
}

const { x, a } = icaProblem(64, 40000, 15, 1);
if (process.argv.includes('--tracenorm-only')) x.length = 0;
for (const method of x.length > 0 ? (['extended-infomax', 'fastica'] as const) : []) {
  fitIca(x.map((r) => r.subarray(0, 4000)), { nComponents: 15, method, seed: 0 }); // warm-up (JIT)
  const [fitted, seconds, cpu] = time(() => fitIca(x, { nComponents: 15, method, seed: 0 }));
  const p = fitted.unmixing.map((row) => Array.from({ length: 15 }, (_, j) => {
    let acc = 0;
    for (let c = 0; c < 64; c++) acc += row[c]! * a[c * 15 + j]!;
    return acc;
  }));
  console.log(`ICA ${method}: 64 ch × 40000 samples → 15 components in ${seconds.toFixed(2)} s (CPU ${cpu.toFixed(2)} s), ` +
    `${fitted.iterations} iterations, converged ${fitted.converged}, Amari index ${amariIndex(p).toFixed(4)}`);
}

function symmetricProblem(nTrials: number, side: number, seed: number, effect: number) {
  const rng = createRng(seed);
  const dim = side * side;
  const labels = Uint8Array.from({ length: nTrials }, (_, i) => i % 2);
  const u = Float64Array.from({ length: 2 * side }, () => rng.nextNormal() / Math.sqrt(side));
  const x = new Float64Array(nTrials * dim);
  for (let i = 0; i < nTrials; i++) {
    const sgn = labels[i] === 1 ? effect : -effect;
    for (let a = 0; a < side; a++) {
      for (let c = 0; c <= a; c++) {
        const v = rng.nextNormal() + sgn * side * (u[a]! * u[c]! - 0.5 * u[side + a]! * u[side + c]!);
        x[i * dim + a * side + c] = v;
        x[i * dim + c * side + a] = v;
      }
    }
  }
  return { x, labels };
}

for (const effect of [0.35, 0.12]) {
  const { features, labels } = traceNormProblem(45, 15, 16, 18, 2, effect);
  traceNormPath(features, labels, { count: 10 }); // warm-up (JIT)
  const reps = 5;
  let wall = 0;
  let cpu = 0;
  let path = traceNormPath(features, labels, { count: 10 });
  for (let r = 0; r < reps; r++) {
    const [p, w, c] = time(() => traceNormPath(features, labels, { count: 10 }));
    wall += w;
    cpu += c;
    path = p;
  }
  console.log(`Trace-norm path (planted effect ${effect}): 45 trials, 15 blocks of 16×18, 10 λ from λ_max to 0.05 λ_max: ` +
    `${(wall / reps * 1000).toFixed(0)} ms per path (CPU ${(cpu / reps * 1000).toFixed(0)} ms; mean of ${reps})`);
  path.models.forEach((m, j) => console.log(`  λ/λ_max = ${(path.lambdas[j]! / path.lambdaMax).toFixed(3)}: ` +
    `${m.iterations} iterations, converged ${m.converged}, active blocks [${m.activeBlocks.join(', ')}], ` +
    `ranks [${m.activeBlocks.map((k) => m.ranks[k]).join(', ')}]`));
}

{
  const side = 64;
  const { x, labels } = symmetricProblem(36, side, 3, 0.06);
  for (const symmetric of [true, false]) {
    const features: MatrixFeatures = { nTrials: 36, blocks: [{ rows: side, cols: side, symmetric }], x };
    traceNormPath(features, labels, { count: 3, minRatio: 0.5 }); // warm-up (JIT)
    const [path, wall, cpu] = time(() => traceNormPath(features, labels, { count: 10, minRatio: 0.01, tol: 1e-4, maxIter: 3000 }));
    const its = path.models.reduce((a, m) => a + m.iterations, 0);
    console.log(`Trace-norm path, one ${side}×${side} block, 36 trials, 10 λ to λ_max/100, tol 1e-4, ${symmetric ? 'symmetric prox (eigenvalues)' : 'SVD prox (unflagged)'}: ` +
      `${(wall * 1000).toFixed(0)} ms (CPU ${(cpu * 1000).toFixed(0)} ms), ${its} iterations, ranks [${path.models.map((m) => m.ranks[0]).join(', ')}]`);
  }
}
