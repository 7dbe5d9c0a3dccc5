/**
 * Serves the built client (dist/client) when it exists: hashed assets with long caching,
 * and index.html for any other GET outside /api and /ws (history-mode routing).
 */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import express, { type Router } from 'express';

export function clientRouter(clientDir: string): Router | null {
  const index = join(clientDir, 'index.html');
  if (!existsSync(index)) return null;
  const r = express.Router();
  r.use('/assets', express.static(join(clientDir, 'assets'), { immutable: true, maxAge: '1y', fallthrough: false }));
  r.use(express.static(clientDir, { index: false, maxAge: 0 }));
  r.get(/^\/(?!api(\/|$)|ws(\/|$)).*/, (req, res, next) => {
    if (!req.accepts('html')) { next(); return; }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(index);
  });
  return r;
}
