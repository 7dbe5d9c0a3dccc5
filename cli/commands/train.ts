// `aftercue train`: nested cross-validation and the frozen decoder from EDF/BDF recordings.
// Writes the sealed decoder artifact (MODEL.json) and the training report (REPORT.json); a
// plain-text progress bar on stderr is updated in place with carriage returns.
import { COVARIANCE_MAPS, DEFAULT_COVARIANCE_MAP, type CovarianceMap } from '../../shared/decoder/recipes/covariance-map';
import { readFileSync, writeFileSync } from 'node:fs';
import { basename } from 'node:path';
import { InvalidArgumentError, type Command } from 'commander';
import { edfToRecording, readEdf } from '../../shared/formats/edf';
import { serialiseArtifact } from '../../shared/decoder/artifact';
import { RECIPE_NAMES, type RecipeName } from '../../shared/decoder/recipes';
import { trainDecoder, type TrainProgress } from '../../shared/decoder/train';
import type { Recording } from '../../shared/types';

/** Reads an EDF/EDF+/BDF file into a Recording (no size limit: the user chose the file). */
export function readRecording(file: string): Recording {
  return edfToRecording(readEdf(new Uint8Array(readFileSync(file)), { maxBytes: Number.MAX_SAFE_INTEGER }));
}

/** Parses "A,B" into two class names. */
export function parseClasses(text: string): [string, string] {
  const parts = text.split(',').map((s) => s.trim()).filter((s) => s.length > 0);
  if (parts.length !== 2) throw new InvalidArgumentError(`expected two class names like T1,T2, got '${text}'`);
  return [parts[0]!, parts[1]!];
}

function int(min: number) {
  return (v: string) => {
    const n = Number(v);
    if (!Number.isInteger(n) || n < min) throw new InvalidArgumentError(`expected an integer >= ${min}, got '${v}'`);
    return n;
  };
}

function num(v: string): number {
  const n = Number(v);
  if (!Number.isFinite(n)) throw new InvalidArgumentError(`expected a number, got '${v}'`);
  return n;
}

/** A one-line progress bar: "[#####-----]  50% cross-validation 5/10  12 s". */
export function progressLine(p: TrainProgress, elapsedS: number, width = 30): string {
  const frac = p.total > 0 ? Math.min(1, p.done / p.total) : 0;
  const filled = Math.round(frac * width);
  return `[${'#'.repeat(filled)}${'-'.repeat(width - filled)}] ${String(Math.round(frac * 100)).padStart(3)}% ` +
    `${p.phase} ${p.done}/${p.total}  ${elapsedS.toFixed(0)} s`;
}

interface TrainCliOptions {
  edf: string[]; classes: [string, string]; tmin: number; tmax: number; out: string; report: string;
  recipe: RecipeName; folds: number; inner: number; repeats: number; seed: number; components?: number;
  prior: boolean; baselines: boolean; covarianceMap?: CovarianceMap;
}

export function register(program: Command): void {
  program
    .command('train')
    .description('train a decoder: nested cross-validation, baselines on the same folds, and the frozen (sealed) decoder')
    .requiredOption('--edf <files...>', 'EDF/EDF+/BDF recordings with cue annotations (same channels and rate)')
    .requiredOption('--classes <A,B>', 'the two cue annotation texts, in class order', parseClasses)
    .requiredOption('--tmin <s>', 'epoch start relative to the cue, s', num)
    .requiredOption('--tmax <s>', 'epoch end relative to the cue, s (exclusive)', num)
    .requiredOption('--out <MODEL.json>', 'where to write the sealed decoder artifact')
    .requiredOption('--report <REPORT.json>', 'where to write the training report')
    .option('--recipe <name>', `decoding recipe: ${RECIPE_NAMES.join(' | ')}`, (v: string) => {
      if (!RECIPE_NAMES.includes(v as RecipeName)) throw new InvalidArgumentError(`expected ${RECIPE_NAMES.join(' or ')}, got '${v}'`);
      return v as RecipeName;
    }, 'component-tf')
    .option('--folds <k>', 'outer cross-validation folds', int(2), 10)
    .option('--inner <k>', 'inner folds for choosing lambda', int(2), 5)
    .option('--repeats <n>', 'repeats of the outer cross-validation with different seeds', int(1), 1)
    .option('--seed <n>', 'seed of the fold plans and ICA', int(0), 0)
    .option('--components <n>', 'ICA components (component-tf, default 15) or covariance rank (covariance, default: all channels)', int(1))
    .option('--no-prior', 'switch the component plausibility prior off (all w_k = 1)')
    .option('--covariance-map <map>', `covariance recipe's feature map: ${COVARIANCE_MAPS.join(' | ')} (default ${DEFAULT_COVARIANCE_MAP}; log = tangent space)`, (v: string) => {
      if (!COVARIANCE_MAPS.includes(v as CovarianceMap)) throw new InvalidArgumentError(`expected ${COVARIANCE_MAPS.join(' or ')}, got '${v}'`);
      return v as CovarianceMap;
    })
    .option('--no-baselines', 'skip the CSP + LDA and band power + logistic baselines')
    .action((o: TrainCliOptions) => {
      const recordings = o.edf.map(readRecording);
      const t0 = performance.now();
      const tty = process.stderr.isTTY === true;
      let last = 0;
      const { artifact, report } = trainDecoder(recordings, {
        recipe: o.recipe, classes: o.classes, tminS: o.tmin, tmaxS: o.tmax, folds: o.folds, inner: o.inner,
        repeats: o.repeats, seed: o.seed, prior: o.prior, baselines: o.baselines, sourceNames: o.edf.map((f) => basename(f)),
        ...(o.components !== undefined ? { components: o.components } : {}),
        ...(o.covarianceMap !== undefined ? { recipeOptions: { covarianceMap: o.covarianceMap } } : {}),
      }, (p) => {
        const now = performance.now();
        if (p.done !== p.total && now - last < 200) return;
        last = now;
        process.stderr.write(`\r${progressLine(p, (now - t0) / 1000)}${tty ? '' : '\n'}`);
      });
      process.stderr.write('\n');
      writeFileSync(o.out, serialiseArtifact(artifact));
      writeFileSync(o.report, `${JSON.stringify(report, null, 2)}\n`);
      const b = report.baselines;
      process.stderr.write(`${report.recipe}: nested CV accuracy ${report.nestedCvAccuracy.toFixed(3)} ` +
        `(95% ${report.wilson95.map((v) => v.toFixed(3)).join('-')}, chance threshold ${report.chanceThreshold95.toFixed(3)}) on ${report.trials} trials` +
        (b ? `; CSP+LDA ${b.cspLda.accuracy.toFixed(3)}, band power+logistic ${b.bandpowerLogreg.accuracy.toFixed(3)}` : '') +
        `\nmodel ${o.out} (sha256 ${artifact.sha256}), report ${o.report}\n`);
    });
}
