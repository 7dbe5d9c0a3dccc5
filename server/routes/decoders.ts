/**
 * Decoders: /api/studies/:studyId/decoders (import, decoder:import) and /api/decoders (list and
 * detail with decoder:read, freeze with decoder:freeze, artifact download).
 */
import express, { Router, type RequestHandler } from 'express';
import { DECODER_IMPORT_LIMIT_BYTES, decoderListQuerySchema, importDecoderRequestSchema } from '../../shared/api/decoders';
import { actor, requirePermission } from '../http/guards';
import { parseBody, parseId, parseQuery } from '../http/parse';
import type { DecoderService } from '../services/decoders';

const importJson = express.json({ limit: DECODER_IMPORT_LIMIT_BYTES });

/**
 * JSON body parser with the raised limit, for POST /api/studies/:studyId/decoders only. Mount it
 * before the API's general JSON parser: a parsed body is not parsed again.
 */
export const decoderImportBodyParser: RequestHandler = (req, res, next) => {
  if (req.method === 'POST' && /^\/studies\/[^/]+\/decoders\/?$/.test(req.path)) importJson(req, res, next);
  else next();
};

/** Mounted at /api/studies/:studyId/decoders. */
export function studyDecodersRouter(svc: DecoderService): Router {
  const r = Router({ mergeParams: true });
  r.post('/', requirePermission('decoder:import'), (req, res) => {
    const studyId = parseId(req.params.studyId, 'Study');
    const input = parseBody(importDecoderRequestSchema, req.body);
    res.status(201).json(svc.import(studyId, input, actor(req)));
  });
  return r;
}

/** Mounted at /api/decoders. */
export function decodersRouter(svc: DecoderService): Router {
  const r = Router();

  r.get('/', requirePermission('decoder:read'), (req, res) => {
    res.json(svc.list(parseQuery(decoderListQuerySchema, req.query).studyId));
  });

  r.get('/:decoderId', requirePermission('decoder:read'), (req, res) => {
    res.json(svc.get(parseId(req.params.decoderId, 'Decoder')));
  });

  r.post('/:decoderId/freeze', requirePermission('decoder:freeze'), (req, res) => {
    res.json(svc.freeze(parseId(req.params.decoderId, 'Decoder'), actor(req)));
  });

  r.get('/:decoderId/artifact', requirePermission('decoder:read'), (req, res) => {
    const a = svc.artifact(parseId(req.params.decoderId, 'Decoder'));
    res.type('application/json').attachment(a.fileName).setHeader('X-Artifact-Sha256', a.sha256);
    res.send(a.text);
  });

  return r;
}
