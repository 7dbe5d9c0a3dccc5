/** /api/rigs: list (rig:read), create and update (rig:manage). */
import { Router } from 'express';
import { createRigRequestSchema, updateRigRequestSchema } from '../../shared/api';
import { actor, requirePermission } from '../http/guards';
import { parseBody, parseId } from '../http/parse';
import type { RigService } from '../services/rigs';

export function rigsRouter(svc: RigService): Router {
  const r = Router();

  r.get('/', requirePermission('rig:read'), (_req, res) => {
    res.json(svc.list());
  });

  r.post('/', requirePermission('rig:manage'), (req, res) => {
    const input = parseBody(createRigRequestSchema, req.body);
    // The key is in this answer only; never cache it.
    res.setHeader('Cache-Control', 'no-store');
    res.status(201).json(svc.create(input, actor(req)));
  });

  r.patch('/:rigId', requirePermission('rig:manage'), (req, res) => {
    const rigId = parseId(req.params.rigId, 'Rig');
    const input = parseBody(updateRigRequestSchema, req.body);
    res.json(svc.update(rigId, input, actor(req)));
  });

  return r;
}
