/** User accounts, managed by admins: invitations by mail, role and display-name changes, disabling. */
import type { InviteUserRequest, UpdateUserRequest, User } from '../../shared/api';
import { deleteSessionsOfUser } from '../db/queries/sessions';
import { insertToken } from '../db/queries/tokens';
import { deleteUser, findUserByEmail, findUserById, insertUser, listUsers, updateUser } from '../db/queries/users';
import type { UserRow } from '../db/schema';
import type { Actor, AppContext } from '../context';
import { AppError, notFound } from '../errors';
import { writeAudit } from './audit';
import { INVITE_TOKEN_HOURS } from './auth';
import { invitationMail, setPasswordLink } from './mail-templates';
import { newToken } from './passwords';

export function toUser(u: UserRow): User {
  return {
    id: u.id, email: u.email, displayName: u.displayName, role: u.role, disabled: u.disabled,
    passwordSet: u.passwordHash !== null, createdAt: u.createdAt.toISOString(),
    lastLoginAt: u.lastLoginAt ? u.lastLoginAt.toISOString() : null,
  };
}

export function userService(ctx: AppContext) {
  const { db } = ctx;
  return {
    list(): User[] {
      return listUsers(db).map(toUser);
    },

    /** Creates the account without a password and mails a 72 h set-password link; undone if the mail fails. */
    async invite(input: InviteUserRequest, actor: Actor): Promise<User> {
      const now = ctx.now();
      const { token, hash } = newToken();
      const user = db.transaction(() => {
        if (findUserByEmail(db, input.email)) {
          throw new AppError('duplicate-email', 'An account with this e-mail address exists', 409, { email: 'Already in use' });
        }
        const u = insertUser(db, { email: input.email, displayName: input.displayName, role: input.role, passwordHash: null }, now);
        insertToken(db, { userId: u.id, purpose: 'invite', tokenHash: hash,
          expiresAt: new Date(now.getTime() + INVITE_TOKEN_HOURS * 3_600_000) }, now);
        return u;
      });
      try {
        await ctx.mail.sendMail(invitationMail(user.email, user.displayName, user.role,
          setPasswordLink(ctx.publicUrl, token), INVITE_TOKEN_HOURS));
      } catch (err) {
        deleteUser(db, user.id);
        ctx.log.error(`invitation mail for ${user.email} could not be sent`, err);
        throw new AppError('mail-failed', 'The invitation mail could not be sent; nothing was saved', 502);
      }
      writeAudit(db, actor, { action: 'user.invite', targetType: 'user', targetId: user.id,
        details: { email: user.email, role: user.role } }, now);
      return toUser(user);
    },

    /** An admin cannot disable or demote their own account (there must always be an admin who can undo). */
    update(userId: number, input: UpdateUserRequest, actor: Actor): User {
      const now = ctx.now();
      return db.transaction(() => {
        const current = findUserById(db, userId);
        if (!current) throw notFound('User');
        if (userId === actor.id && (input.disabled === true || (input.role !== undefined && input.role !== current.role))) {
          throw new AppError('own-account', 'You cannot disable or demote your own account', 409);
        }
        const updated = updateUser(db, userId, input, now)!;
        if (input.disabled === true) deleteSessionsOfUser(db, userId);
        writeAudit(db, actor, { action: 'user.update', targetType: 'user', targetId: userId,
          details: { before: pick(current, input), after: input } }, now);
        return toUser(updated);
      });
    },
  };
}
export type UserService = ReturnType<typeof userService>;

function pick(row: UserRow, changes: UpdateUserRequest): Record<string, unknown> {
  return Object.fromEntries(Object.keys(changes).map((k) => [k, row[k as keyof UpdateUserRequest]]));
}
