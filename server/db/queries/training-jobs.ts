/** SQL for training jobs: the queue (oldest queued first), progress updates and outcomes. */
import { asc, desc, eq, inArray } from 'drizzle-orm';
import type { Db } from '../client';
import { trainingJobs, type TrainingJobRow } from '../schema';

export type TrainingJobValues = Pick<TrainingJobRow, 'studyId' | 'name' | 'params' | 'purpose' | 'createdBy'>;

export function insertTrainingJob(db: Db, values: TrainingJobValues, now: Date): TrainingJobRow {
  return db.orm.insert(trainingJobs).values({ ...values, status: 'queued', progress: 0, stage: 'queued', createdAt: now })
    .returning().get();
}

export function findTrainingJob(db: Db, id: number): TrainingJobRow | undefined {
  return db.orm.select().from(trainingJobs).where(eq(trainingJobs.id, id)).get();
}

export function listTrainingJobs(db: Db, studyId: number): TrainingJobRow[] {
  return db.orm.select().from(trainingJobs).where(eq(trainingJobs.studyId, studyId))
    .orderBy(desc(trainingJobs.createdAt), desc(trainingJobs.id)).all();
}

/** The oldest queued job, or undefined. */
export function nextQueuedJob(db: Db): TrainingJobRow | undefined {
  return db.orm.select().from(trainingJobs).where(eq(trainingJobs.status, 'queued'))
    .orderBy(asc(trainingJobs.id)).limit(1).get();
}

export function markJobRunning(db: Db, id: number, now: Date): void {
  db.orm.update(trainingJobs).set({ status: 'running', startedAt: now, progress: 0, stage: 'starting', error: null })
    .where(eq(trainingJobs.id, id)).run();
}

export function updateJobProgress(db: Db, id: number, progress: number, stage: string): void {
  db.orm.update(trainingJobs).set({ progress, stage }).where(eq(trainingJobs.id, id)).run();
}

export function markJobDone(db: Db, id: number, decoderId: number, now: Date): void {
  db.orm.update(trainingJobs).set({ status: 'done', progress: 1, stage: 'done', decoderId, finishedAt: now })
    .where(eq(trainingJobs.id, id)).run();
}

export function markJobFailed(db: Db, id: number, error: string, now: Date): void {
  db.orm.update(trainingJobs).set({ status: 'failed', stage: 'failed', error, finishedAt: now })
    .where(eq(trainingJobs.id, id)).run();
}

/** Puts jobs a stopped server left running back in the queue; returns how many. */
export function requeueInterruptedJobs(db: Db): number {
  return db.orm.update(trainingJobs).set({ status: 'queued', progress: 0, stage: 'queued (restarted)', startedAt: null })
    .where(inArray(trainingJobs.status, ['running'])).run().changes;
}

/** Changes the job's parameters (the demo job records the recording it simulated). */
export function updateJobParams(db: Db, id: number, params: Record<string, unknown>): void {
  db.orm.update(trainingJobs).set({ params }).where(eq(trainingJobs.id, id)).run();
}
