/**
 * Sign-in and the password flows. Invitation tokens live 72 h, reset tokens 1 h; both are
 * single-use, stored as SHA-256 only, and setting a password ends every session of that user.
 */
import { permissionsFor, type Me } from '../../shared/api';
import { deleteSessionsOfUser } from '../db/queries/sessions';
import { findTokenByHash, insertToken, useAllTokensOfUser } from '../db/queries/tokens';
import { findUserByEmail, findUserById, updateUser } from '../db/queries/users';
import type { UserRow } from '../db/schema';
import type { Actor, AppContext } from '../context';
import { AppError } from '../errors';
import { writeAudit } from './audit';
import { resetMail, setPasswordLink } from './mail-templates';
import { hashPassword, newToken, sha256Hex, verifyPassword } from './passwords';

export const INVITE_TOKEN_HOURS = 72;
export const RESET_TOKEN_MINUTES = 60;

export type CredentialCheck = { ok: true; user: Actor } | { ok: false; code: 'invalid-credentials' | 'account-disabled' };

export function toActor(u: UserRow): Actor {
  return { id: u.id, email: u.email, displayName: u.displayName, role: u.role };
}

export function toMe(a: Actor): Me {
  return { id: a.id, email: a.email, displayName: a.displayName, role: a.role, permissions: permissionsFor(a.role) };
}

export function authService(ctx: AppContext) {
  const { db } = ctx;
  // Compared against when the account is unknown or has no password, so timing does not tell.
  let dummyHash: Promise<string> | null = null;
  const dummy = () => (dummyHash ??= hashPassword('no account has this password', ctx.config.bcryptCost));

  const invalidToken = () => new AppError('invalid-token', 'This link is invalid, already used or expired', 400);

  return {
    async verifyCredentials(email: string, password: string): Promise<CredentialCheck> {
      const user = findUserByEmail(db, email);
      const ok = await verifyPassword(password, user?.passwordHash ?? await dummy());
      if (!user || !user.passwordHash || !ok) {
        writeAudit(db, null, { action: 'auth.login-failed', targetType: 'user', targetId: user?.id ?? null }, ctx.now(), email);
        return { ok: false, code: 'invalid-credentials' };
      }
      if (user.disabled) {
        writeAudit(db, toActor(user), { action: 'auth.login-refused', targetType: 'user', targetId: user.id,
          details: { reason: 'disabled' } }, ctx.now());
        return { ok: false, code: 'account-disabled' };
      }
      return { ok: true, user: toActor(user) };
    },

    /** Called after the session was regenerated for `actor`. */
    recordLogin(actor: Actor): Me {
      const now = ctx.now();
      db.transaction(() => {
        updateUser(db, actor.id, { lastLoginAt: now }, now);
        writeAudit(db, actor, { action: 'auth.login', targetType: 'user', targetId: actor.id }, now);
      });
      return toMe(actor);
    },

    recordLogout(actor: Actor): void {
      writeAudit(db, actor, { action: 'auth.logout', targetType: 'user', targetId: actor.id }, ctx.now());
    },

    /** The user behind a session, or null when the account is gone or disabled (the session then ends). */
    sessionUser(id: number): Actor | null {
      const u = findUserById(db, id);
      return u && !u.disabled ? toActor(u) : null;
    },

    me(actor: Actor): Me {
      return toMe(actor);
    },

    /** Mails a reset link when the account exists and is enabled; says nothing either way. */
    async requestPasswordReset(email: string): Promise<void> {
      const user = findUserByEmail(db, email);
      if (!user || user.disabled) return;
      const now = ctx.now();
      const { token, hash } = newToken();
      db.transaction(() => {
        insertToken(db, { userId: user.id, purpose: 'reset', tokenHash: hash,
          expiresAt: new Date(now.getTime() + RESET_TOKEN_MINUTES * 60_000) }, now);
        writeAudit(db, null, { action: 'auth.password-reset-requested', targetType: 'user', targetId: user.id }, now, email);
      });
      try {
        await ctx.mail.sendMail(resetMail(user.email, user.displayName, setPasswordLink(ctx.publicUrl, token), RESET_TOKEN_MINUTES));
      } catch (err) {
        ctx.log.error(`password reset mail for user ${user.id} could not be sent`, err);
      }
    },

    /** Sets the password behind an invitation or reset token; the token (and any other of the user's) is spent. */
    async setPassword(token: string, password: string): Promise<void> {
      const tokenHash = sha256Hex(token);
      const usable = () => {
        const row = findTokenByHash(db, tokenHash);
        const user = row ? findUserById(db, row.userId) : undefined;
        return row && !row.usedAt && row.expiresAt.getTime() > ctx.now().getTime() && user && !user.disabled
          ? { row, user } : null;
      };
      if (!usable()) throw invalidToken();
      const passwordHash = await hashPassword(password, ctx.config.bcryptCost);
      const now = ctx.now();
      db.transaction(() => {
        // Checked again inside the transaction: a second request with the same token may have won meanwhile.
        const found = usable();
        if (!found) throw invalidToken();
        updateUser(db, found.user.id, { passwordHash }, now);
        useAllTokensOfUser(db, found.user.id, now);
        deleteSessionsOfUser(db, found.user.id);
        writeAudit(db, toActor(found.user), { action: 'auth.password-set', targetType: 'user', targetId: found.user.id,
          details: { via: found.row.purpose } }, now);
      });
    },
  };
}
export type AuthService = ReturnType<typeof authService>;
