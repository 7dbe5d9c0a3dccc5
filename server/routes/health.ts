/** /api/health (public): liveness and version. */
import { readFileSync } from 'node:fs';
import { Router } from 'express';
import type { HealthResponse } from '../../shared/api';

export const VERSION: string = (JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version: string }).version;

export function healthRouter(): Router {
  const r = Router();
  r.get('/', (_req, res) => {
    const body: HealthResponse = { status: 'ok', version: VERSION };
    res.json(body);
  });
  return r;
}
