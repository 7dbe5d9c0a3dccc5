/** /api/users (admin): list, invite, update. */
import { Router } from 'express';
import { inviteUserRequestSchema, updateUserRequestSchema } from '../../shared/api';
import { actor, requirePermission } from '../http/guards';
import { parseBody, parseId } from '../http/parse';
import type { UserService } from '../services/users';

export function usersRouter(svc: UserService): Router {
  const r = Router();
  const manage = requirePermission('user:manage');

  r.get('/', manage, (_req, res) => {
    res.json(svc.list());
  });

  r.post('/invitations', manage, async (req, res) => {
    const input = parseBody(inviteUserRequestSchema, req.body);
    res.status(201).json(await svc.invite(input, actor(req)));
  });

  r.patch('/:userId', manage, (req, res) => {
    const userId = parseId(req.params.userId, 'User');
    const input = parseBody(updateUserRequestSchema, req.body);
    res.json(svc.update(userId, input, actor(req)));
  });

  return r;
}
