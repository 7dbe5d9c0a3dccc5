/** SQL for user accounts. */
import { asc, eq, sql } from 'drizzle-orm';
import type { Db } from '../client';
import { users, type UserRow } from '../schema';
import type { Role } from '../../../shared/api';

export function findUserByEmail(db: Db, email: string): UserRow | undefined {
  return db.orm.select().from(users).where(eq(users.email, email)).get();
}

export function findUserById(db: Db, id: number): UserRow | undefined {
  return db.orm.select().from(users).where(eq(users.id, id)).get();
}

export function listUsers(db: Db): UserRow[] {
  return db.orm.select().from(users).orderBy(asc(users.email)).all();
}

export function countUsers(db: Db): number {
  return db.orm.select({ n: sql<number>`count(*)` }).from(users).get()?.n ?? 0;
}

export interface NewUser {
  email: string;
  displayName: string;
  role: Role;
  passwordHash: string | null;
}

export function insertUser(db: Db, u: NewUser, now: Date): UserRow {
  return db.orm.insert(users).values({ ...u, disabled: false, createdAt: now, updatedAt: now }).returning().get();
}

export interface UserChanges {
  role?: Role;
  disabled?: boolean;
  displayName?: string;
  passwordHash?: string;
  lastLoginAt?: Date;
}

export function updateUser(db: Db, id: number, changes: UserChanges, now: Date): UserRow | undefined {
  return db.orm.update(users).set({ ...changes, updatedAt: now }).where(eq(users.id, id)).returning().get();
}

export function deleteUser(db: Db, id: number): void {
  db.orm.delete(users).where(eq(users.id, id)).run();
}
