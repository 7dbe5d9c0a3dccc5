/**
 * Real-data benchmark on the EEG Motor Movement/Imagery Dataset (eegmmidb), subjects S001-S010,
 * imagery runs R04 + R08 + R12 pooled (45 trials per subject), T1 (left fist) vs T2 (right fist).
 * Protocol of shared/data/eegmmidb/REFERENCE-ACCURACY.md: stratified 10-fold cross-validation,
 * 5 seeded repeats (--repeats), everything fitted inside the folds (trainDecoder), both
 * recipes and both baselines on the same folds; plus the later-run check: fit on R04 + R08,
 * replay R12 through the frozen decoder's live stream (predictRecording).
 *
 * Run: npx tsx bench/eegmmidb.ts [--subjects S001,S002] [--repeats 5] [--recipes covariance,component-tf] [--json] [--no-later] [--no-baselines]
 *        [--jobs N]: N child processes, one subject each (the 2-core machine: --jobs 2); CPU is summed over them
 *        [--components N] (ICA components / covariance rank, as `aftercue train --components`) [--no-prior]
 *        [--covariance-map linear|log] (the covariance recipe's feature map, as `aftercue train --covariance-map`)
 *        [--select-by accuracy|logLoss] (how the inner CV ranks λ; default accuracy, ties by log-loss)
 *        [--csp-only]: only CSP + shrinkage LDA, causal (as the product filters) and zero-phase (as the
 *        reference protocol filters: Butterworth order 4, 8-30 Hz, forward-backward on the continuous run)
 *        [--zero-phase]: the covariance recipe and CSP + shrinkage LDA, both on epochs filtered zero-phase
 *        as the reference protocol does (offline only: a forward-backward filter on the continuous run
 *        needs samples after the epoch), same outer folds as trainDecoder
 *
 * Data: Schalk et al. 2004, IEEE TBME 51(6):1034-1043; Goldberger et al. 2000, Circulation
 * 101(23):e215-e220; PhysioNet eegmmidb v1.0.0; Open Data Commons Attribution License v1.0.
 */
import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { cspStage } from '../shared/decoder/baselines/csp';
import { shrinkageLdaStage } from '../shared/decoder/baselines/shrinkage-lda';
import { epochRecording } from '../shared/decoder/epochs';
import { channelsInOrder, designPreprocessing, preprocessRecording } from '../shared/decoder/online';
import { butterSos, sosfiltfilt, type Sos } from '../shared/dsp';
import { crossValidate } from '../shared/evaluation/cross-validate';
import { repeatedStratifiedKFold } from '../shared/evaluation/folds';
import { summariseCv } from '../shared/decoder/recipes/report';
import { fitPipeline, type AnyStage } from '../shared/decoder/pipeline';
import { loadDecoder, predictRecording } from '../shared/decoder/predict';
import type { RecipeName } from '../shared/decoder/recipes';
import { COVARIANCE_MAPS, type CovarianceMap } from '../shared/decoder/recipes/covariance-map';
import type { SelectBy } from '../shared/evaluation/nested';
import { EEGMMIDB_CITATION, fitDecoder, prepareTraining, runBaselines, trainDecoder, type TrainingReport } from '../shared/decoder/train';
import { normaliseChannelName } from '../shared/montage';
import { edfToRecording, readEdf } from '../shared/formats/edf';
import type { Recording } from '../shared/types';

const DIR = new URL('../../shared/data/eegmmidb/', import.meta.url);

/** REFERENCE-ACCURACY.md, per subject: CSP(6)+shrinkage LDA, log band power + L2 logistic, component-tf (NumPy), covariance (NumPy, 1 split). */
const REFERENCE: Record<string, [number, number, number, number]> = {
  S001: [0.667, 0.516, 0.573, 0.689], S002: [0.933, 0.689, 0.707, 0.933], S003: [0.564, 0.449, 0.480, 0.711],
  S004: [0.622, 0.538, 0.618, 0.556], S005: [0.631, 0.462, 0.493, 0.711], S006: [0.418, 0.551, 0.480, 0.511],
  S007: [0.969, 0.684, 0.827, 1.000], S008: [0.653, 0.564, 0.711, 0.533], S009: [0.453, 0.493, 0.476, 0.511],
  S010: [0.636, 0.458, 0.498, 0.556],
};

function arg(name: string): string | undefined {
  const i = process.argv.indexOf(name);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

const subjects = (arg('--subjects') ?? Object.keys(REFERENCE).join(',')).split(',');
const repeats = Number(arg('--repeats') ?? 5);
const recipes = (arg('--recipes') ?? 'covariance,component-tf').split(',') as RecipeName[];
const json = process.argv.includes('--json');
const later = !process.argv.includes('--no-later');
const components = arg('--components') === undefined ? {} : { components: Number(arg('--components')) };
const prior = !process.argv.includes('--no-prior');
const withBaselines = !process.argv.includes('--no-baselines');
const jobs = Number(arg('--jobs') ?? 1);
const covarianceMap = arg('--covariance-map') as CovarianceMap | undefined;
if (covarianceMap !== undefined && !COVARIANCE_MAPS.includes(covarianceMap)) throw new Error(`--covariance-map: expected ${COVARIANCE_MAPS.join(' or ')}`);
const selectBy = arg('--select-by') as SelectBy | undefined;
if (selectBy !== undefined && selectBy !== 'accuracy' && selectBy !== 'logLoss') throw new Error('--select-by: expected accuracy or logLoss');
const recipeOptions = covarianceMap === undefined && selectBy === undefined ? {}
  : { recipeOptions: { ...(covarianceMap === undefined ? {} : { covarianceMap }), ...(selectBy === undefined ? {} : { lambda: { selectBy } }) } };

function load(subject: string, run: string): Recording {
  return edfToRecording(readEdf(new Uint8Array(readFileSync(new URL(`${subject}${run}.edf`, DIR)))));
}

function cpu(): number {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1e6;
}

/** CSP + shrinkage LDA fitted on the training runs, accuracy on the test run's cues (same causal 8-30 Hz epochs as the baselines). */
function cspLaterRun(train: Recording[], test: Recording): number {
  const spec = designPreprocessing({ sampleRateHz: test.sampleRateHz, channelNames: test.channelNames, bandpassHz: [8, 30], car: false });
  const ep = (r: Recording) => epochRecording(preprocessRecording(spec, r), { classes: ['T1', 'T2'] }, 0.5, 2.5);
  const tr = train.map(ep);
  const fp = fitPipeline([cspStage({ pairs: 3 }) as AnyStage, shrinkageLdaStage() as AnyStage], tr.flatMap((e) => e.epochs),
                         Uint8Array.from(tr.flatMap((e) => Array.from(e.labels))));
  const te = ep(test);
  const pred = fp.predict(te.epochs);
  return pred.reduce((c, p, i) => c + (p === te.labels[i] ? 1 : 0), 0) / pred.length;
}

/**
 * Nested CV of `stages` on epochs filtered zero-phase (forward-backward, on the continuous run: the
 * reference protocol's filter, offline only), same outer folds as trainDecoder.
 */
function zeroPhaseCv(runs: Recording[], sos: Sos, channelNames: readonly string[], tminS: number, tmaxS: number,
                     stages: () => AnyStage[], reps: number): { accuracy: number; labels: Uint8Array } {
  const eps = runs.map((r) => epochRecording({ ...r, data: sosfiltfilt(sos, channelsInOrder(r, channelNames)) }, { classes: ['T1', 'T2'] }, tminS, tmaxS));
  const epochs = eps.flatMap((e) => e.epochs);
  const labels = Uint8Array.from(eps.flatMap((e) => Array.from(e.labels)));
  const plans = repeatedStratifiedKFold(labels, 10, reps, 0);
  return { accuracy: summariseCv(plans.map((pl) => crossValidate(stages, epochs, labels, pl, { innerK: 5 })), labels, 1).accuracy, labels };
}

/** CSP + shrinkage LDA under the reference protocol's zero-phase 8-30 Hz filter (Butterworth order 4), epochs 0.5-2.5 s. */
function cspZeroPhase(runs: Recording[], reps: number): number {
  return zeroPhaseCv(runs, butterSos(4, [8, 30], 'bandpass', runs[0]!.sampleRateHz), runs[0]!.channelNames, 0.5, 2.5,
                     () => [cspStage({ pairs: 3 }) as AnyStage, shrinkageLdaStage() as AnyStage], reps).accuracy;
}

/** The covariance recipe's nested CV (its own stages, λ by inner 5-fold CV) under the same zero-phase filter of its own band-pass design. */
function covarianceZeroPhase(runs: Recording[], reps: number): number {
  const p = prepareTraining(runs, { recipe: 'covariance', classes: ['T1', 'T2'], ...recipeOptions });
  const r = zeroPhaseCv(runs, p.plan.preprocess.bandpass.sos, p.channelNames, p.plan.window.tminS, p.plan.window.tmaxS, () => p.plan.stages(), reps);
  if (r.labels.some((l, i) => l !== p.data.labels[i])) throw new Error('zero-phase epochs do not match the recipe trials');
  return r.accuracy;
}

if (process.argv.includes('--zero-phase')) {
  const lines = [`Zero-phase filter (reference protocol), stratified 10-fold x ${repeats}, same folds as trainDecoder${covarianceMap ? `; covariance map ${covarianceMap}` : ''}`,
                 '| subject | covariance recipe | CSP + shrinkage LDA |', '|---|---|---|'];
  const acc: number[][] = [];
  for (const subject of subjects) {
    const runs = ['R04', 'R08', 'R12'].map((r) => load(subject, r));
    const row = [covarianceZeroPhase(runs, repeats), cspZeroPhase(runs, repeats)];
    acc.push(row);
    lines.push(`| ${subject} | ${row[0]!.toFixed(3)} | ${row[1]!.toFixed(3)} |`);
    process.stderr.write(`${lines[lines.length - 1]}\n`);
  }
  const m = (k: number) => (acc.reduce((a, r) => a + r[k]!, 0) / acc.length).toFixed(3);
  lines.push(`| mean | ${m(0)} | ${m(1)} |`);
  process.stdout.write(`${lines.join('\n')}\n`);
  process.exit(0);
}

if (process.argv.includes('--csp-only')) {
  const lines = [`CSP(6) + shrinkage LDA, stratified 10-fold x ${repeats}, same folds as trainDecoder; causal = product filter, zero-phase = reference protocol`,
                 '| subject | causal | zero-phase | ref |', '|---|---|---|---|'];
  const acc: number[][] = [];
  for (const subject of subjects) {
    const runs = ['R04', 'R08', 'R12'].map((r) => load(subject, r));
    const labels = Uint8Array.from(runs.flatMap((r) => Array.from(epochRecording(r, { classes: ['T1', 'T2'] }, 0.5, 2.5).labels)));
    const causal = runBaselines(runs, runs[0]!.channelNames.map(normaliseChannelName), ['T1', 'T2'], labels,
                                { folds: 10, inner: 5, repeats, seed: 0 }).cspLda.accuracy;
    const zero = cspZeroPhase(runs, repeats);
    acc.push([causal, zero, REFERENCE[subject]![0]]);
    lines.push(`| ${subject} | ${causal.toFixed(3)} | ${zero.toFixed(3)} | ${REFERENCE[subject]![0].toFixed(3)} |`);
  }
  const m = (k: number) => (acc.reduce((a, r) => a + r[k]!, 0) / acc.length).toFixed(3);
  lines.push(`| mean | ${m(0)} | ${m(1)} | ${m(2)} |`);
  process.stdout.write(`${lines.join('\n')}\n`);
  process.exit(0);
}

interface Row {
  subject: string; trials: number;
  recipes: Record<string, { accuracy: number; cvSeconds: number; cvCpuSeconds: number | null; rank: number; selected: number | null;
                            laterRun: number | null; timings: TrainingReport['timings']; edgeFolds: number; folds: number }>;
  cspLda: number; bandpowerLogreg: number; cspLaterRun: number | null;
}

/** One subject: both recipes (and, with the first, the baselines) on the same folds, plus the later-run check. */
function runSubject(subject: string): Row {
  const runs = ['R04', 'R08', 'R12'].map((r) => load(subject, r));
  const sourceNames = ['R04', 'R08', 'R12'].map((r) => `${subject}${r}.edf`);
  const row: Row = { subject, trials: 0, recipes: {}, cspLda: NaN, bandpowerLogreg: NaN, cspLaterRun: null };
  recipes.forEach((recipe, j) => {
    const { report } = trainDecoder(runs, { recipe, classes: ['T1', 'T2'], folds: 10, inner: 5, repeats, seed: 0, baselines: withBaselines && j === 0, sourceNames,
                                          prior, ...components, ...recipeOptions });
    row.trials = report.trials;
    if (report.baselines) { row.cspLda = report.baselines.cspLda.accuracy; row.bandpowerLogreg = report.baselines.bandpowerLogreg.accuracy; }
    let laterRun: number | null = null;
    if (later) {
      const artifact = fitDecoder(runs.slice(0, 2), { recipe, classes: ['T1', 'T2'], seed: 0, sourceNames: sourceNames.slice(0, 2),
                                                    prior, ...components, ...recipeOptions });
      laterRun = predictRecording(loadDecoder(JSON.parse(JSON.stringify(artifact)) as unknown), runs[2]!, ['T1', 'T2']).accuracy;
    }
    const grid = (report.settings.lambda ?? {}) as { minRatio?: number };
    const edge = report.lambda.perFoldRelative.filter((r) => grid.minRatio !== undefined && Math.abs(r - grid.minRatio) <= 1e-9 * grid.minRatio).length;
    row.recipes[recipe] = { accuracy: report.nestedCvAccuracy, cvSeconds: report.timings.cvSeconds, cvCpuSeconds: report.timings.cvCpuSeconds,
                            rank: report.rank, selected: report.selectedComponents?.length ?? null, laterRun, timings: report.timings,
                            edgeFolds: edge, folds: report.lambda.perFoldRelative.length };
    process.stderr.write(`${subject} ${recipe}: ${report.nestedCvAccuracy.toFixed(3)} (cv ${report.timings.cvSeconds.toFixed(1)} s wall, ` +
      `${report.timings.cvCpuSeconds?.toFixed(1)} s cpu per ${repeats} repeat(s))${laterRun === null ? '' : `, later run ${laterRun.toFixed(3)}`}\n`);
  });
  if (later && withBaselines) row.cspLaterRun = cspLaterRun(runs.slice(0, 2), runs[2]!);
  return row;
}

interface ChildResult { rows: Row[]; cpuSeconds: number; memory: { maxRssMB: number; heapUsedMB: number } }

/** --jobs N: one child process per subject, N at a time (each is the single-subject --json run), results merged in subject order. */
async function runInChildren(n: number): Promise<{ rows: Row[]; cpuSeconds: number; maxRssMB: number }> {
  const passOn = process.argv.slice(2).filter((a, i, all) => !['--jobs', '--subjects'].includes(a) && !['--jobs', '--subjects'].includes(all[i - 1] ?? '')
                                                          && a !== '--json');
  const results = new Map<string, ChildResult>();
  const queue = [...subjects];
  const worker = async () => {
    for (let subject = queue.shift(); subject !== undefined; subject = queue.shift()) {
      const s = subject;
      const out = await new Promise<string>((resolve, reject) => {
        const child = spawn(process.execPath, [...process.execArgv, fileURLToPath(import.meta.url), ...passOn, '--subjects', s, '--json'],
                            { stdio: ['ignore', 'pipe', 'inherit'] });
        let text = '';
        child.stdout.on('data', (d: Buffer) => { text += d.toString(); });
        child.on('error', reject);
        child.on('close', (code) => (code === 0 ? resolve(text) : reject(new Error(`${s}: exited with ${code}`))));
      });
      results.set(s, JSON.parse(out) as ChildResult);
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(n, subjects.length)) }, worker));
  const all = subjects.map((s) => results.get(s)!);
  return { rows: all.flatMap((r) => r.rows), cpuSeconds: all.reduce((a, r) => a + r.cpuSeconds, 0),
           maxRssMB: Math.max(...all.map((r) => r.memory.maxRssMB)) };
}

const t0 = performance.now();
let rows: Row[];
let cpuTotal: number;
let maxRssMB: number;
if (jobs > 1 && !json) {
  ({ rows, cpuSeconds: cpuTotal, maxRssMB } = await runInChildren(jobs));
} else {
  rows = subjects.map(runSubject);
  cpuTotal = cpu();
  maxRssMB = process.resourceUsage().maxRSS / 1024;
}
const totalS = (performance.now() - t0) / 1000;
const mem = { maxRssMB, heapUsedMB: process.memoryUsage().heapUsed / 2 ** 20 };

const mean = (f: (r: Row) => number | null | undefined) => {
  const v = rows.map(f).filter((x): x is number => typeof x === 'number' && Number.isFinite(x));
  return v.length ? v.reduce((a, b) => a + b, 0) / v.length : NaN;
};
const f3 = (x: number | null | undefined) => (typeof x === 'number' && Number.isFinite(x) ? x.toFixed(3) : '  -  ');
if (json) {
  process.stdout.write(`${JSON.stringify({ repeats, recipes, rows, totalSeconds: totalS, cpuSeconds: cpuTotal, memory: mem, citation: EEGMMIDB_CITATION }, null, 2)}\n`);
} else {
  const lines: string[] = [];
  lines.push(`eegmmidb S001-S010 subset, R04+R08+R12, T1 vs T2; stratified 10-fold x ${repeats} repeat(s), inner 5-fold; ours vs REFERENCE-ACCURACY.md (ref)` +
    `${components.components === undefined ? '' : `; components/rank ${components.components}`}${prior ? '' : '; prior off'}` +
    `${covarianceMap === undefined ? '' : `; covariance map ${covarianceMap}`}${selectBy === undefined ? '' : `; λ by inner ${selectBy}`}`);
  lines.push('| subject | trials | CSP+LDA | ref | bandpower+LR | ref | component-tf | ref | covariance | ref (1 split) | cv s (wall/cpu) comp-tf | cv s cov |');
  lines.push('|---|---|---|---|---|---|---|---|---|---|---|---|');
  const secs = (r: Row, k: string) => (r.recipes[k] ? `${r.recipes[k]!.cvSeconds.toFixed(0)}/${r.recipes[k]!.cvCpuSeconds?.toFixed(0)}` : '-');
  for (const r of rows) {
    const ref = REFERENCE[r.subject] ?? [NaN, NaN, NaN, NaN];
    lines.push(`| ${r.subject} | ${r.trials} | ${f3(r.cspLda)} | ${f3(ref[0])} | ${f3(r.bandpowerLogreg)} | ${f3(ref[1])} | ` +
      `${f3(r.recipes['component-tf']?.accuracy)} | ${f3(ref[2])} | ${f3(r.recipes.covariance?.accuracy)} | ${f3(ref[3])} | ${secs(r, 'component-tf')} | ${secs(r, 'covariance')} |`);
  }
  const refMean = (k: number) => mean((r) => REFERENCE[r.subject]?.[k]);
  lines.push(`| mean | | ${f3(mean((r) => r.cspLda))} | ${f3(refMean(0))} | ${f3(mean((r) => r.bandpowerLogreg))} | ${f3(refMean(1))} | ` +
    `${f3(mean((r) => r.recipes['component-tf']?.accuracy))} | ${f3(refMean(2))} | ${f3(mean((r) => r.recipes.covariance?.accuracy))} | ${f3(refMean(3))} | | |`);
  if (later) {
    lines.push('', 'Later run: fit on R04+R08 (30 trials), frozen decoder replayed on R12 (15 trials) through the live stream');
    lines.push('| subject | CSP+LDA | component-tf | covariance |', '|---|---|---|---|');
    for (const r of rows) lines.push(`| ${r.subject} | ${f3(r.cspLaterRun)} | ${f3(r.recipes['component-tf']?.laterRun)} | ${f3(r.recipes.covariance?.laterRun)} |`);
    lines.push(`| mean | ${f3(mean((r) => r.cspLaterRun))} | ${f3(mean((r) => r.recipes['component-tf']?.laterRun))} | ${f3(mean((r) => r.recipes.covariance?.laterRun))} |`);
  }
  for (const k of recipes) {
    const e = rows.reduce((a, r) => a + (r.recipes[k]?.edgeFolds ?? 0), 0);
    const f = rows.reduce((a, r) => a + (r.recipes[k]?.folds ?? 0), 0);
    const c = rows.map((r) => r.recipes[k]?.cvCpuSeconds).filter((x): x is number => typeof x === 'number');
    lines.push('', `${k}: smallest λ of the grid chosen in ${e} of ${f} outer folds; nested CV CPU per subject ${Math.min(...c).toFixed(0)}-${Math.max(...c).toFixed(0)} s ` +
      `(${repeats} repeat(s)), ${(c.reduce((a, b) => a + b, 0) / c.length / repeats).toFixed(0)} s per repeat on average`);
  }
  lines.push('', `total ${totalS.toFixed(0)} s wall, ${cpuTotal.toFixed(0)} s CPU${jobs > 1 ? ` (${jobs} processes, one subject each)` : ''}; peak RSS ${mem.maxRssMB.toFixed(0)} MB`);
  lines.push(`Data: ${EEGMMIDB_CITATION}`);
  process.stdout.write(`${lines.join('\n')}\n`);
}
