/**
 * /api/studies/:studyId/recordings: list (study:read) and upload (recording:upload) of raw
 * EDF/EDF+/BDF bytes as application/octet-stream, up to RECORDING_UPLOAD_LIMIT_BYTES.
 */
import express, { Router } from 'express';
import { RECORDING_UPLOAD_LIMIT_BYTES, uploadRecordingQuerySchema } from '../../shared/api/recordings';
import { AppError } from '../errors';
import { actor, requirePermission } from '../http/guards';
import { parseId, parseQuery } from '../http/parse';
import type { RecordingService } from '../services/recordings';

const rawBody = express.raw({ type: 'application/octet-stream', limit: RECORDING_UPLOAD_LIMIT_BYTES });

export function recordingsRouter(svc: RecordingService): Router {
  const r = Router({ mergeParams: true });

  r.get('/', requirePermission('study:read'), (req, res) => {
    res.json(svc.list(parseId(req.params.studyId, 'Study')));
  });

  // Permission, query and content type are checked before the body is read: a refused call never uploads 200 MB.
  r.post('/', requirePermission('recording:upload'), (req, _res, next) => {
    parseQuery(uploadRecordingQuerySchema, req.query);
    if (!req.is('application/octet-stream')) {
      throw new AppError('unsupported-media-type', 'Send the file as application/octet-stream', 415);
    }
    next();
  }, rawBody, (req, res) => {
    const studyId = parseId(req.params.studyId, 'Study');
    const q = parseQuery(uploadRecordingQuerySchema, req.query);
    res.status(201).json(svc.upload(studyId, q, Buffer.isBuffer(req.body) ? req.body : undefined, actor(req)));
  });

  return r;
}
