/**
 * Training jobs: /api/studies/:studyId/training-jobs (create, training:run) and
 * /api/training-jobs (list by study and read one, study:read; clients poll them).
 */
import { Router } from 'express';
import { createTrainingJobRequestSchema, trainingJobListQuerySchema } from '../../shared/api/training-jobs';
import { actor, requirePermission } from '../http/guards';
import { parseBody, parseId, parseQuery } from '../http/parse';
import type { TrainingJobService } from '../services/training-jobs';

/** Mounted at /api/studies/:studyId/training-jobs. */
export function studyTrainingJobsRouter(svc: TrainingJobService): Router {
  const r = Router({ mergeParams: true });
  r.post('/', requirePermission('training:run'), (req, res) => {
    const studyId = parseId(req.params.studyId, 'Study');
    const input = parseBody(createTrainingJobRequestSchema, req.body);
    res.status(201).json(svc.create(studyId, input, actor(req)));
  });
  return r;
}

/** Mounted at /api/training-jobs. */
export function trainingJobsRouter(svc: TrainingJobService): Router {
  const r = Router();
  r.get('/', requirePermission('study:read'), (req, res) => {
    res.json(svc.list(parseQuery(trainingJobListQuerySchema, req.query).studyId));
  });
  r.get('/:jobId', requirePermission('study:read'), (req, res) => {
    res.json(svc.get(parseId(req.params.jobId, 'Training job')));
  });
  return r;
}
