/** SQL for studies; rows come back joined with the creator's display name. */
import { desc, eq, getTableColumns } from 'drizzle-orm';
import type { Db } from '../client';
import { studies, users, type StudyRow } from '../schema';

export type StudyWithCreator = StudyRow & { createdByName: string };

export type StudyValues = Pick<StudyRow, 'name' | 'description' | 'ethicsReference' | 'cueClasses' | 'epochStartS'
  | 'epochEndS' | 'channelNames' | 'sampleRateHz' | 'powerLineHz' | 'recipe'>;

function selectWithCreator(db: Db) {
  return db.orm.select({ ...getTableColumns(studies), createdByName: users.displayName })
    .from(studies).innerJoin(users, eq(users.id, studies.createdBy));
}

export function listStudies(db: Db, includeArchived: boolean): StudyWithCreator[] {
  const q = selectWithCreator(db);
  return (includeArchived ? q : q.where(eq(studies.status, 'active'))).orderBy(desc(studies.createdAt), desc(studies.id)).all();
}

export function findStudy(db: Db, id: number): StudyWithCreator | undefined {
  return selectWithCreator(db).where(eq(studies.id, id)).get();
}

export function insertStudy(db: Db, values: StudyValues, createdBy: number, now: Date): number {
  return db.orm.insert(studies).values({ ...values, createdBy, status: 'active', createdAt: now, updatedAt: now })
    .returning({ id: studies.id }).get().id;
}

export function updateStudy(db: Db, id: number, changes: Partial<StudyValues>, now: Date): void {
  db.orm.update(studies).set({ ...changes, updatedAt: now }).where(eq(studies.id, id)).run();
}

export function archiveStudy(db: Db, id: number, now: Date): void {
  db.orm.update(studies).set({ status: 'archived', archivedAt: now, updatedAt: now }).where(eq(studies.id, id)).run();
}
