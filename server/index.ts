/**
 * Starts Aftercue: checks the configuration, opens the database (migrations applied), starts
 * mail, seeds an empty database, builds the app and listens. WebSocket routes (server/ws/) attach
 * to the returned httpServer; nothing here handles 'upgrade'.
 */
import { rmSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { buildApp } from './app';
import { resolveConfig, type Config, type StartOptions } from './config';
import type { AppContext } from './context';
import { openDb, type Db } from './db/client';
import { createLogger } from './log';
import { createServices, type Services } from './services';
import { createMailService, type MailService } from './services/mail';
import { seedIfEmpty, type SeedResult } from './services/seed';
import type { Express, RequestHandler } from 'express';

export type { StartOptions } from './config';

export interface ServerHandle {
  /** Base URL the server answers on, e.g. http://127.0.0.1:5170 (no trailing slash). */
  url: string;
  port: number;
  httpServer: Server;
  /** The Express app (its router stack lists every HTTP route). */
  app: Express;
  db: Db;
  mail: MailService;
  /** Service layer, for in-process callers (WebSocket routes, the embedded bridge, tests). */
  services: Services;
  /** Session middleware, to authenticate WebSocket upgrades by the login cookie. */
  sessionMiddleware: RequestHandler;
  config: Config;
  /** What first-start seeding created (demo accounts, rig key shown once), or null. */
  seeded: SeedResult | null;
  stop(): Promise<void>;
}

const PRUNE_INTERVAL_MS = 10 * 60_000;

function urlHost(host: string): string {
  if (host === '0.0.0.0' || host === '::') return 'localhost';
  return host.includes(':') ? `[${host}]` : host;
}

export async function start(opts: StartOptions = {}): Promise<ServerHandle> {
  const config = resolveConfig(opts);
  const log = createLogger(config.quiet);
  const db = openDb(config.dbFile);
  let mail: MailService;
  try {
    mail = await createMailService({ db, log, from: config.mailFrom, smtpUrl: config.smtpUrl });
  } catch (err) {
    db.close();
    throw err;
  }
  const ctx: AppContext = { config, db, mail, log, publicUrl: config.publicUrl ?? '', now: () => new Date() };
  const services = createServices(ctx);
  const seeded = await seedIfEmpty(ctx);
  const { app, sessionMiddleware, sessionStore } = buildApp(ctx, services);

  const httpServer = createServer(app);
  await new Promise<void>((resolve, reject) => {
    httpServer.once('error', reject);
    httpServer.listen(config.port, config.host, () => { httpServer.off('error', reject); resolve(); });
  }).catch(async (err: unknown) => {
    await mail.stop();
    db.close();
    throw err;
  });
  const port = (httpServer.address() as AddressInfo).port;
  const url = `http://${urlHost(config.host)}:${port}`;
  ctx.publicUrl = config.publicUrl ?? `http://localhost:${port}`;

  const pruneTimer = setInterval(() => sessionStore.prune(), PRUNE_INTERVAL_MS);
  pruneTimer.unref();

  let stopping: Promise<void> | null = null;
  async function stop(): Promise<void> {
    stopping ??= (async () => {
      clearInterval(pruneTimer);
      httpServer.closeIdleConnections();
      await new Promise<void>((resolve) => httpServer.close(() => resolve()));
      await mail.stop();
      db.close();
      if (config.uploadsDirIsTemp) rmSync(config.uploadsDir, { recursive: true, force: true });
    })();
    return stopping;
  }

  return { url, port, httpServer, app, db, mail, services, sessionMiddleware, config, seeded, stop };
}
