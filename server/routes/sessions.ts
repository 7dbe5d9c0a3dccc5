/**
 * /api/sessions: pilot sessions. Reading needs session:read; everything that changes a session
 * (create, start, pause, resume, stop, annotate, mark trials, display link) needs session:run.
 * The gap review of a stopped session (JSON, PDF) needs session:read; mailing it to the investigator session:run.
 */
import { Router } from 'express';
import {
  createAnnotationRequestSchema, createSessionRequestSchema, listSessionsQuerySchema, updateTrialRequestSchema,
} from '../../shared/api';
import { actor, requirePermission } from '../http/guards';
import { parseBody, parseId, parseQuery } from '../http/parse';
import type { ReviewService } from '../services/review';
import type { SessionService } from '../services/sessions';

export function sessionsRouter(svc: SessionService & { review: ReviewService }): Router {
  const r = Router();
  const id = (v: string | string[] | undefined) => parseId(v, 'Session');

  r.get('/', requirePermission('session:read'), (req, res) => {
    const q = parseQuery(listSessionsQuerySchema, req.query);
    if (q.studyId !== undefined) svc.checkStudy(q.studyId);
    res.json(svc.list(q.studyId));
  });

  r.post('/', requirePermission('session:run'), (req, res) => {
    res.status(201).json(svc.create(parseBody(createSessionRequestSchema, req.body), actor(req)));
  });

  r.get('/:sessionId', requirePermission('session:read'), (req, res) => {
    res.json(svc.get(id(req.params.sessionId)));
  });

  r.post('/:sessionId/start', requirePermission('session:run'), async (req, res) => {
    res.json(await svc.start(id(req.params.sessionId), actor(req)));
  });
  r.post('/:sessionId/pause', requirePermission('session:run'), async (req, res) => {
    res.json(await svc.pause(id(req.params.sessionId), actor(req)));
  });
  r.post('/:sessionId/resume', requirePermission('session:run'), async (req, res) => {
    res.json(await svc.resume(id(req.params.sessionId), actor(req)));
  });
  r.post('/:sessionId/stop', requirePermission('session:run'), async (req, res) => {
    res.json(await svc.stop(id(req.params.sessionId), actor(req)));
  });

  r.post('/:sessionId/annotations', requirePermission('session:run'), async (req, res) => {
    const sessionId = id(req.params.sessionId);
    const input = parseBody(createAnnotationRequestSchema, req.body);
    res.status(201).json(await svc.annotate(sessionId, input.text, actor(req)));
  });

  r.get('/:sessionId/events', requirePermission('session:read'), (req, res) => {
    res.json(svc.events(id(req.params.sessionId)));
  });

  r.get('/:sessionId/trials', requirePermission('session:read'), (req, res) => {
    res.json(svc.trials(id(req.params.sessionId)));
  });

  r.get('/:sessionId/trials.csv', requirePermission('session:read'), async (req, res) => {
    const { csv, fileName } = await svc.trialsCsv(id(req.params.sessionId));
    res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
    res.type('text/csv').send(csv);
  });

  r.get('/:sessionId/review', requirePermission('session:read'), async (req, res) => {
    res.json(await svc.review.get(id(req.params.sessionId)));
  });
  r.get('/:sessionId/review.pdf', requirePermission('session:read'), async (req, res) => {
    const { pdf, fileName } = await svc.review.pdf(id(req.params.sessionId));
    res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
    res.type('application/pdf').send(pdf);
  });
  r.post('/:sessionId/review/mail', requirePermission('session:run'), async (req, res) => {
    res.status(201).json(await svc.review.mail(id(req.params.sessionId), actor(req)));
  });

  r.patch('/:sessionId/trials/:trialId', requirePermission('session:run'), async (req, res) => {
    const sessionId = id(req.params.sessionId);
    const trialId = parseId(req.params.trialId, 'Trial');
    const input = parseBody(updateTrialRequestSchema, req.body);
    res.json(await svc.updateTrial(sessionId, trialId, input, actor(req)));
  });

  r.post('/:sessionId/display-link', requirePermission('session:run'), (req, res) => {
    res.status(201).json(svc.displayLink(id(req.params.sessionId), actor(req)));
  });

  return r;
}
