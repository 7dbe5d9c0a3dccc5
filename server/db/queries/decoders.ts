/**
 * SQL for decoders. Lists and summaries never load the artifact text. There is deliberately no
 * function that rewrites an artifact: a decoder's artifact is written once, at insert; freezing
 * only sets status/frozen_at/frozen_by (and the database's triggers refuse any later change).
 */
import { and, desc, eq, getTableColumns } from 'drizzle-orm';
import { alias } from 'drizzle-orm/sqlite-core';
import type { Db } from '../client';
import { decoders, users, type DecoderRow } from '../schema';

export type DecoderValues = Omit<DecoderRow, 'id' | 'createdAt' | 'status' | 'frozenAt' | 'frozenBy'>;

/** A decoder without its artifact, report and interpretation, with the names of who made and froze it. */
export type DecoderListRow = Omit<DecoderRow, 'artifact' | 'report' | 'interpretation'>
  & { createdByName: string | null; frozenByName: string | null };

export type DecoderDetailRow = DecoderListRow & Pick<DecoderRow, 'report' | 'interpretation'>;

const creator = alias(users, 'creator');
const freezer = alias(users, 'freezer');
const { artifact: _a, report: _r, interpretation: _i, ...listColumns } = getTableColumns(decoders);

function selectList(db: Db) {
  return db.orm.select({ ...listColumns, createdByName: creator.displayName, frozenByName: freezer.displayName })
    .from(decoders)
    .leftJoin(creator, eq(creator.id, decoders.createdBy))
    .leftJoin(freezer, eq(freezer.id, decoders.frozenBy));
}

export function insertDecoder(db: Db, values: DecoderValues, now: Date): number {
  return db.orm.insert(decoders).values({ ...values, status: 'draft', createdAt: now })
    .returning({ id: decoders.id }).get().id;
}

export function listDecoders(db: Db, studyId: number): DecoderListRow[] {
  return selectList(db).where(eq(decoders.studyId, studyId)).orderBy(desc(decoders.createdAt), desc(decoders.id)).all();
}

export function findDecoder(db: Db, id: number): DecoderListRow | undefined {
  return selectList(db).where(eq(decoders.id, id)).get();
}

export function findDecoderDetail(db: Db, id: number): DecoderDetailRow | undefined {
  return db.orm.select({ ...listColumns, report: decoders.report, interpretation: decoders.interpretation,
    createdByName: creator.displayName, frozenByName: freezer.displayName })
    .from(decoders)
    .leftJoin(creator, eq(creator.id, decoders.createdBy))
    .leftJoin(freezer, eq(freezer.id, decoders.frozenBy))
    .where(eq(decoders.id, id)).get();
}

/** The stored artifact text and its seal. */
export function findDecoderArtifact(db: Db, id: number): Pick<DecoderRow, 'id' | 'name' | 'status' | 'artifact' | 'sha256'> | undefined {
  return db.orm.select({ id: decoders.id, name: decoders.name, status: decoders.status, artifact: decoders.artifact,
    sha256: decoders.sha256 }).from(decoders).where(eq(decoders.id, id)).get();
}

/** Sets a draft decoder frozen; returns false when it was not a draft (already frozen). */
export function freezeDecoder(db: Db, id: number, by: number | null, now: Date): boolean {
  const r = db.orm.update(decoders).set({ status: 'frozen', frozenAt: now, frozenBy: by })
    .where(and(eq(decoders.id, id), eq(decoders.status, 'draft'))).run();
  return r.changes === 1;
}
