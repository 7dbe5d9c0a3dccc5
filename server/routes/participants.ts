/** /api/studies/:studyId/participants: list (study:read), create and edit (participant:*). */
import { Router } from 'express';
import { createParticipantRequestSchema, updateParticipantRequestSchema } from '../../shared/api';
import { actor, requirePermission } from '../http/guards';
import { parseBody, parseId } from '../http/parse';
import type { ParticipantService } from '../services/participants';

export function participantsRouter(svc: ParticipantService): Router {
  const r = Router({ mergeParams: true });

  r.get('/', requirePermission('study:read'), (req, res) => {
    res.json(svc.list(parseId(req.params.studyId, 'Study')));
  });

  r.post('/', requirePermission('participant:create'), (req, res) => {
    const studyId = parseId(req.params.studyId, 'Study');
    const input = parseBody(createParticipantRequestSchema, req.body);
    res.status(201).json(svc.create(studyId, input, actor(req)));
  });

  r.patch('/:participantId', requirePermission('participant:edit'), (req, res) => {
    const studyId = parseId(req.params.studyId, 'Study');
    const participantId = parseId(req.params.participantId, 'Participant');
    const input = parseBody(updateParticipantRequestSchema, req.body);
    res.json(svc.update(studyId, participantId, input, actor(req)));
  });

  return r;
}
