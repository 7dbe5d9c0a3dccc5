import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { verifyArtifact } from '../../shared/decoder/artifact';
import type { TrainingReport } from '../../shared/decoder/train';
import type { PredictOutput } from '../../shared/decoder/predict';
import { writeEdfPlus } from '../../shared/formats/edf';
import { eegmmidbPath, skipWithoutRealData } from '../helpers/real-data';
import { syntheticRecording } from '../fixtures/decoder/synthetic';

const root = fileURLToPath(new URL('../../', import.meta.url));
const cli = (...args: string[]) => spawnSync(process.execPath, ['--import', 'tsx', 'cli/main.ts', ...args], { cwd: root, encoding: 'utf8' });

describe('aftercue train and predict on a generated recording', () => {
  const dir = mkdtempSync(join(tmpdir(), 'aftercue-train-'));
  const trainFile = join(dir, 'calibration.edf'), testFile = join(dir, 'session.edf');
  writeFileSync(trainFile, writeEdfPlus(syntheticRecording({ seed: 21, trials: 24 })));
  writeFileSync(testFile, writeEdfPlus(syntheticRecording({ seed: 22, trials: 12 })));
  const model = join(dir, 'MODEL.json'), reportFile = join(dir, 'REPORT.json');
  const train = cli('train', '--edf', trainFile, '--classes', 'left,right', '--tmin', '-0.5', '--tmax', '4', '--out', model,
                    '--report', reportFile, '--recipe', 'component-tf', '--folds', '3', '--inner', '3', '--components', '4', '--seed', '3');

  it('writes a sealed model and a report with the issue\'s fields, and a progress bar on stderr', () => {
    expect(train.status, train.stderr).toBe(0);
    // Source: issue 4 part 7 (progress bar on stderr, carriage-return updates).
    expect(train.stderr).toMatch(/\r\[[#-]{30}\] +\d+% cross-validation/);
    // Source: artifact.ts (SHA-256 seal over the canonical bytes).
    expect(verifyArtifact(JSON.parse(readFileSync(model, 'utf8')))).toBe(true);
    const report = JSON.parse(readFileSync(reportFile, 'utf8')) as TrainingReport;
    // Source: issue 4 part 7 (REPORT.json holds at least these fields).
    for (const key of ['recipe', 'trials', 'classes', 'nestedCvAccuracy', 'wilson95', 'chanceThreshold95', 'auc', 'kappa', 'itrBitsPerMin',
                       'foldAccuracies', 'repeatAccuracies', 'lambda', 'rank', 'selectedComponents', 'baselines', 'timings', 'citation']) {
      expect(report, key).toHaveProperty(key);
    }
    expect(report.trials).toBe(24);
    expect(report.foldAccuracies).toHaveLength(3);
    // Source: scipy.stats.binom.ppf(0.95, 24, 0.5) = 16 (REFERENCES.md §5 definition): 17 of 24 correct needed.
    expect(report.chanceThreshold95).toBeCloseTo(17 / 24, 12);
    expect(Object.keys(report.baselines!)).toEqual(['cspLda', 'bandpowerLogreg']);
    expect(Object.keys(report.timings)).toEqual(expect.arrayContaining(['totalSeconds', 'icaSeconds', 'featureSeconds', 'solverSeconds']));
    // Source: train.ts (the citation appears only for eegmmidb file names).
    expect(report.citation).toBeNull();
    // Common practice: a strong generated ERD must be decodable well above chance.
    expect(report.nestedCvAccuracy).toBeGreaterThan(0.75);
  });

  it('predicts a new recording through the live stream and prints the trials as JSON', () => {
    const r = cli('predict', '--model', model, '--edf', testFile, '--classes', 'left,right');
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout) as PredictOutput;
    // Source: issue 4 part 7 (predict prints {trials: [{onsetS, trueClass, predictedClass, probability}], accuracy}).
    expect(out.trials).toHaveLength(12);
    expect(Object.keys(out.trials[0]!)).toEqual(expect.arrayContaining(['onsetS', 'trueClass', 'predictedClass', 'probability']));
    const correct = out.trials.filter((t) => t.trueClass === t.predictedClass).length;
    expect(out.accuracy).toBeCloseTo(correct / 12, 12);
    expect(out.accuracy).toBeGreaterThan(0.7);
  });

  it('refuses a model whose bytes were changed', () => {
    const text = readFileSync(model, 'utf8');
    const bad = join(dir, 'MODEL-edited.json');
    writeFileSync(bad, text.replace('"left"', '"LEFT"'));
    const r = cli('predict', '--model', bad, '--edf', testFile, '--classes', 'left,right');
    // Source: artifact.ts (verifyArtifact detects any change).
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/hash mismatch/);
  });
});

describe('aftercue train and predict on real recordings', () => {
  it.skipIf(skipWithoutRealData)('trains the covariance recipe on S007R04+R08 and predicts the later run S007R12', () => {
    const dir = mkdtempSync(join(tmpdir(), 'aftercue-train-real-'));
    const model = join(dir, 'MODEL.json'), reportFile = join(dir, 'REPORT.json');
    const t = cli('train', '--edf', eegmmidbPath('S007R04.edf'), eegmmidbPath('S007R08.edf'), '--classes', 'T1,T2', '--tmin', '0.5', '--tmax', '2.5',
                  '--out', model, '--report', reportFile, '--recipe', 'covariance', '--folds', '3', '--inner', '3', '--no-baselines');
    expect(t.status, t.stderr).toBe(0);
    const report = JSON.parse(readFileSync(reportFile, 'utf8')) as TrainingReport;
    // Source: ../shared/data/eegmmidb/README.md (15 task cues per run) and train.ts (eegmmidb citation).
    expect(report.trials).toBe(30);
    expect(report.citation).toMatch(/Schalk G.*1034-1043.*Goldberger AL.*e215-e220/);
    expect(report.spatialPatterns!.length).toBeGreaterThan(0);
    const p = cli('predict', '--model', model, '--edf', eegmmidbPath('S007R12.edf'), '--classes', 'T1,T2');
    expect(p.status, p.stderr).toBe(0);
    const out = JSON.parse(p.stdout) as PredictOutput;
    // Source: ../shared/data/eegmmidb/README.md (15 cues in R12); REFERENCE-ACCURACY.md (S007 is decodable: CSP 0.969).
    expect(out.trials).toHaveLength(15);
    expect(out.accuracy).toBeGreaterThan(0.6);
  });
});
