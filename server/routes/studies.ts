/** /api/studies: list and read (study:read), create, edit, archive. */
import { Router } from 'express';
import { createStudyRequestSchema, studyListQuerySchema, updateStudyRequestSchema } from '../../shared/api';
import { actor, requirePermission } from '../http/guards';
import { parseBody, parseId, parseQuery } from '../http/parse';
import type { StudyService } from '../services/studies';

export function studiesRouter(svc: StudyService): Router {
  const r = Router();

  r.get('/', requirePermission('study:read'), (req, res) => {
    res.json(svc.list(parseQuery(studyListQuerySchema, req.query)));
  });

  r.post('/', requirePermission('study:create'), (req, res) => {
    const input = parseBody(createStudyRequestSchema, req.body);
    res.status(201).json(svc.create(input, actor(req)));
  });

  r.get('/:studyId', requirePermission('study:read'), (req, res) => {
    res.json(svc.get(parseId(req.params.studyId, 'Study')));
  });

  r.patch('/:studyId', requirePermission('study:edit'), (req, res) => {
    const studyId = parseId(req.params.studyId, 'Study');
    const input = parseBody(updateStudyRequestSchema, req.body);
    res.json(svc.update(studyId, input, actor(req)));
  });

  r.post('/:studyId/archive', requirePermission('study:archive'), (req, res) => {
    res.json(svc.archive(parseId(req.params.studyId, 'Study'), actor(req)));
  });

  return r;
}
