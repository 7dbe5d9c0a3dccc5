/**
 * `npm run bench`: every speed and accuracy benchmark in turn, each in its own process so one
 * does not warm or slow another. Each script prints its own figures; this only sequences them.
 *   npm run bench               quick set (filters, CWT, solvers, predict, simulator, demo flags)
 *   npm run bench -- --full     adds the ten-subject eegmmidb benchmark and the live and console benchmarks
 * The README's figures come from these scripts; rerun them on an idle machine to compare.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const root = fileURLToPath(new URL('..', import.meta.url));
const full = process.argv.includes('--full');

const runs: [string, string[]][] = [
  ['bench/dsp.ts', []],
  ['bench/tf.ts', []],
  ['bench/solver.ts', []],
  ['bench/predict.ts', []],
  ['simulator/bench.ts', []],
  ['bench/demo-flags.ts', []],
  ...(full ? [['bench/eegmmidb.ts', ['--jobs', '2']], ['bench/live.ts', ['--json']], ['bench/console.ts', ['--json']]] as [string, string[]][] : []),
];

let failed = 0;
for (const [script, args] of runs) {
  process.stdout.write(`\n=== ${script} ${args.join(' ')}\n`);
  const r = spawnSync(process.execPath, ['--import', 'tsx', script, ...args], { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) { failed++; process.stdout.write(`${script} exited with ${r.status}\n`); }
}
process.exit(failed ? 1 : 0);
