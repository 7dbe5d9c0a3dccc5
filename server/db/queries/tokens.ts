/** SQL for invitation and reset tokens (hashes only). */
import { and, eq, isNull } from 'drizzle-orm';
import type { Db } from '../client';
import { passwordTokens, type PasswordTokenRow } from '../schema';

export function insertToken(db: Db, t: { userId: number; purpose: 'invite' | 'reset'; tokenHash: string; expiresAt: Date },
                            now: Date): void {
  db.orm.insert(passwordTokens).values({ ...t, createdAt: now }).run();
}

export function findTokenByHash(db: Db, tokenHash: string): PasswordTokenRow | undefined {
  return db.orm.select().from(passwordTokens).where(eq(passwordTokens.tokenHash, tokenHash)).get();
}

/** Marks every unused token of the user as used (a password was set; old links must die). */
export function useAllTokensOfUser(db: Db, userId: number, now: Date): void {
  db.orm.update(passwordTokens).set({ usedAt: now })
    .where(and(eq(passwordTokens.userId, userId), isNull(passwordTokens.usedAt))).run();
}
