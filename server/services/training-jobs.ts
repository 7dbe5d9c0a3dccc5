/**
 * Training jobs: a request is checked against the study and its recordings, queued in the
 * database, and run one at a time (by default) in a worker thread (server/workers/runner.ts).
 * Progress is written to the job row for clients to poll; a finished job leaves a draft decoder
 * (source 'training-job'). The seeded demo job simulates a calibration recording, trains on it
 * and freezes the result (source 'demo'). Jobs a stopped server left running are queued again
 * at the next start.
 */
import type { CreateTrainingJobRequest, TrainingJob } from '../../shared/api/training-jobs';
import type { Db } from '../db/client';
import { findRecording } from '../db/queries/recordings';
import {
  findTrainingJob, insertTrainingJob, listTrainingJobs, markJobDone, markJobFailed, markJobRunning, nextQueuedJob,
  requeueInterruptedJobs, updateJobParams, updateJobProgress,
} from '../db/queries/training-jobs';
import type { TrainingJobRow } from '../db/schema';
import type { Actor, AppContext } from '../context';
import { AppError, notFound } from '../errors';
import { CancelledError, runInWorker, type RunningTask } from '../workers/runner';
import { demoTask, type DemoParams } from '../workers/demo';
import type { RecordingFileFacts, TrainOptions, TrainResult, TrainTask } from '../workers/protocol';
import { writeAudit } from './audit';
import { insertDecoderFrom } from './decoders';
import { insertRecordingFile, loadTrainingInput } from './recordings';
import { getActiveStudy, getStudyOr404 } from './studies';

/** Defaults of the nested cross-validation (DESIGN.md "The decoder" 7: outer 10-fold, inner folds for lambda). */
export const TRAINING_DEFAULTS = { folds: 10, inner: 5, seed: 1 } as const;

/** Stored job parameters of a requested job. */
interface JobParams extends Required<Pick<CreateTrainingJobRequest, 'recordingIds' | 'folds' | 'inner' | 'seed'>> {
  recipe: TrainOptions['recipe'];
  classes: string[];
  components?: number;
  prior?: boolean;
  covarianceMap?: CreateTrainingJobRequest['covarianceMap'];
}

/** Minimum interval between progress writes, ms (stage changes are always written). */
const PROGRESS_WRITE_MS = 250;

export function toTrainingJob(j: TrainingJobRow): TrainingJob {
  return {
    id: j.id, studyId: j.studyId, name: j.name, status: j.status, progress: j.progress, stage: j.stage,
    decoderId: j.decoderId, error: j.error, createdAt: j.createdAt.toISOString(), finishedAt: j.finishedAt?.toISOString() ?? null,
  };
}

function mismatch(message: string, fields: Record<string, string>): AppError {
  return new AppError('recording-mismatch', message, 409, fields);
}

/**
 * Checks the recordings against the study: montage channels present, same rate, every class
 * annotated, and at least `folds` cues of each class (stratified folds need one per fold).
 */
function checkRecordings(db: Db, studyId: number, ids: number[], annotationClasses: string[], folds: number,
                         study: { channelNames: string[]; sampleRateHz: number }): void {
  const counts: Record<string, number> = {};
  ids.forEach((id, i) => {
    const r = findRecording(db, id);
    if (!r || r.studyId !== studyId) throw new AppError('validation', 'No such recording in this study', 400, { [`recordingIds.${i}`]: 'Not a recording of this study' });
    const missing = study.channelNames.filter((c) => !r.channelNames.includes(c));
    if (missing.length > 0) throw mismatch(`Recording '${r.name}' lacks study channels ${missing.join(', ')}`, { [`recordingIds.${i}`]: `Missing channels: ${missing.join(', ')}` });
    if (Math.abs(r.sampleRateHz - study.sampleRateHz) > 1e-9) {
      throw mismatch(`Recording '${r.name}' is sampled at ${r.sampleRateHz} Hz, the study at ${study.sampleRateHz} Hz`,
        { [`recordingIds.${i}`]: `Sampled at ${r.sampleRateHz} Hz, not ${study.sampleRateHz} Hz` });
    }
    for (const [label, n] of Object.entries(r.cueCounts)) counts[label] = (counts[label] ?? 0) + n;
  });
  const absent = annotationClasses.filter((c) => !(counts[c]! > 0));
  if (absent.length > 0) {
    throw mismatch(`No cues labelled ${absent.map((c) => `'${c}'`).join(', ')} in the chosen recordings`,
      { classes: `Not found in the recordings: ${absent.join(', ')} (found: ${Object.keys(counts).join(', ') || 'none'})` });
  }
  const fewest = Math.min(...annotationClasses.map((c) => counts[c]!));
  if (folds > fewest) {
    throw new AppError('validation', `${folds} folds need at least ${folds} cues of each class`, 400,
      { folds: `Use at most ${fewest} folds: the smaller class has ${fewest} cues` });
  }
}

export interface TrainingJobServiceOptions {
  /** Jobs run at once; default 1. */
  concurrency?: number;
}

export function trainingJobService(ctx: AppContext, opts: TrainingJobServiceOptions = {}) {
  const { db, log } = ctx;
  const concurrency = opts.concurrency ?? 1;
  const running = new Map<number, RunningTask>();
  let started = false;
  let stopped = false;

  function optionsFor(job: TrainingJobRow, p: JobParams): TrainOptions {
    const s = getStudyOr404(db, job.studyId);
    return {
      recipe: p.recipe, classes: s.cueClasses, annotationClasses: p.classes, channelNames: s.channelNames,
      sampleRateHz: s.sampleRateHz, epochStartS: s.epochStartS, epochEndS: s.epochEndS, powerLineHz: s.powerLineHz,
      folds: p.folds, inner: p.inner, seed: p.seed, components: p.components, prior: p.prior,
      ...(p.covarianceMap !== undefined ? { covarianceMap: p.covarianceMap } : {}),
    };
  }

  function taskFor(job: TrainingJobRow): TrainTask {
    if (job.purpose === 'demo') {
      const task = demoTask(job.params as unknown as DemoParams, getStudyOr404(db, job.studyId));
      // Resumed after a stop: the simulated recording is already stored; train on it rather than simulate again.
      const stored = (job.params as unknown as DemoParams).recordingIds;
      if (stored && stored.length > 0) return { kind: 'train', recordings: stored.map((id) => loadTrainingInput(db, id)), options: task.options };
      return task;
    }
    const p = job.params as unknown as JobParams;
    return { kind: 'train', recordings: p.recordingIds.map((id) => loadTrainingInput(db, id)), options: optionsFor(job, p) };
  }

  function progressWriter(jobId: number) {
    let lastAt = 0;
    let lastStage = '';
    return (fraction: number, stage: string) => {
      const now = Date.now();
      if (stage === lastStage && now - lastAt < PROGRESS_WRITE_MS) return;
      lastAt = now;
      lastStage = stage;
      updateJobProgress(db, jobId, Math.min(1, Math.max(0, fraction)), stage);
    };
  }

  /** Stores the demo's simulated recording and remembers its id in the job's parameters. */
  function storeSimulated(job: TrainingJobRow, bytes: Uint8Array, name: string, facts: RecordingFileFacts): void {
    const now = ctx.now();
    db.transaction(() => {
      const id = insertRecordingFile(db, { studyId: job.studyId, participantId: null, name, source: 'simulated', createdBy: null },
        bytes, facts, now);
      updateJobParams(db, job.id, { ...job.params, recordingIds: [id] });
      writeAudit(db, null, { action: 'recording.simulate', targetType: 'recording', targetId: id, details: { jobId: job.id, name } }, now);
    });
  }

  function finish(job: TrainingJobRow, result: TrainResult): void {
    const now = ctx.now();
    const demo = job.purpose === 'demo';
    const decoderId = db.transaction(() => {
      const id = insertDecoderFrom(db, {
        studyId: job.studyId, name: job.name, source: demo ? 'demo' : 'training-job', createdBy: job.createdBy,
        artifactText: result.artifactText, sha256: result.sha256, facts: result.facts, report: result.report,
        interpretation: result.interpretation, freeze: demo,
      }, now);
      markJobDone(db, job.id, id, now);
      writeAudit(db, null, { action: demo ? 'decoder.demo' : 'decoder.train', targetType: 'decoder', targetId: id,
        details: { jobId: job.id, sha256: result.sha256, frozen: demo } }, now);
      return id;
    });
    if (demo) {
      const acc = result.report.nestedCvAccuracy;
      log.info(`Demo decoder ready: '${job.name}' (decoder ${decoderId}, frozen, sha256 ${result.sha256.slice(0, 12)}…`
        + `${typeof acc === 'number' ? `, cross-validated accuracy ${(acc * 100).toFixed(1)} %` : ''})`);
    }
  }

  async function run(job: TrainingJobRow): Promise<void> {
    markJobRunning(db, job.id, ctx.now());
    let task: RunningTask;
    try {
      task = runInWorker(taskFor(job), {
        onProgress: progressWriter(job.id),
        onRecording: (bytes, name, facts) => { storeSimulated(job, bytes, name, facts); job = findTrainingJob(db, job.id)!; },
      });
    } catch (err) {
      markJobFailed(db, job.id, err instanceof Error ? err.message : String(err), ctx.now());
      return;
    }
    running.set(job.id, task);
    try {
      finish(job, await task.result);
    } catch (err) {
      if (err instanceof CancelledError) return; // stop(): the job goes back to the queue
      const message = err instanceof Error ? err.message : String(err);
      markJobFailed(db, job.id, message, ctx.now());
      log.error(`training job ${job.id} failed`, err);
    } finally {
      running.delete(job.id);
    }
  }

  /** Starts queued jobs while there is room. */
  function pump(): void {
    if (!started || stopped) return;
    while (running.size < concurrency) {
      const job = nextQueuedJob(db);
      if (!job) return;
      // run() marks the job running and registers it synchronously, so the next loop picks another job.
      void run(job).finally(() => setImmediate(pump));
    }
  }

  return {
    list(studyId: number): TrainingJob[] {
      getStudyOr404(db, studyId);
      return listTrainingJobs(db, studyId).map(toTrainingJob);
    },

    get(jobId: number): TrainingJob {
      const j = findTrainingJob(db, jobId);
      if (!j) throw notFound('Training job');
      return toTrainingJob(j);
    },

    create(studyId: number, input: CreateTrainingJobRequest, actor: Actor): TrainingJob {
      const now = ctx.now();
      const job = db.transaction(() => {
        const study = getActiveStudy(db, studyId);
        // The trace-norm engine is a binary classifier (issue 4): two cue classes per decoder.
        if (study.cueClasses.length !== 2) {
          throw new AppError('unsupported-classes', `Decoders separate two classes; this study has ${study.cueClasses.length}`, 409);
        }
        const classes = input.classes ?? study.cueClasses;
        if (classes.length !== study.cueClasses.length) {
          throw new AppError('validation', 'Give one annotation text per study class', 400,
            { classes: `Give ${study.cueClasses.length} texts, one for each of ${study.cueClasses.join(', ')}` });
        }
        checkRecordings(db, studyId, input.recordingIds, classes, input.folds ?? TRAINING_DEFAULTS.folds, study);
        const params: JobParams = {
          recordingIds: input.recordingIds, recipe: input.recipe ?? study.recipe, classes,
          folds: input.folds ?? TRAINING_DEFAULTS.folds, inner: input.inner ?? TRAINING_DEFAULTS.inner,
          seed: input.seed ?? TRAINING_DEFAULTS.seed,
          ...(input.components !== undefined ? { components: input.components } : {}),
          ...(input.prior !== undefined ? { prior: input.prior } : {}),
          ...(input.covarianceMap !== undefined ? { covarianceMap: input.covarianceMap } : {}),
        };
        const row = insertTrainingJob(db, { studyId, name: input.name, params: { ...params }, purpose: 'user', createdBy: actor.id }, now);
        writeAudit(db, actor, { action: 'training.create', targetType: 'training-job', targetId: row.id,
          details: { studyId, recordingIds: input.recordingIds, recipe: params.recipe } }, now);
        return row;
      });
      setImmediate(pump);
      return toTrainingJob(job);
    },

    /** Queues the demo job: simulate a calibration run of `params.profile`, train, freeze. */
    queueDemo(studyId: number, name: string, params: DemoParams): TrainingJob {
      const now = ctx.now();
      const row = insertTrainingJob(db, { studyId, name, params: { ...params }, purpose: 'demo', createdBy: null }, now);
      setImmediate(pump);
      return toTrainingJob(row);
    },

    /** Starts running queued jobs (and re-queues any a previous process left running). */
    start(): void {
      if (started) return;
      started = true;
      const n = requeueInterruptedJobs(db);
      if (n > 0) log.info(`${n} interrupted training job(s) queued again`);
      setImmediate(pump);
    },

    /** Cancels running jobs (they return to the queue) and runs nothing more. */
    async stop(): Promise<void> {
      stopped = true;
      await Promise.all([...running.values()].map((t) => t.cancel()));
      requeueInterruptedJobs(db);
    },
  };
}
export type TrainingJobService = ReturnType<typeof trainingJobService>;
