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
import { DEMO_DECODER_NAME, demoDecoderParams } from './workers/demo';
import { markRigEmbedded } from './db/queries/pilot-sessions';
import { attachLiveSockets } from './ws';
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
  /** Registers cleanup (close sockets, stop the embedded bridge) run first at stop, newest first. */
  onStop(hook: () => void | Promise<void>): void;
  stop(): Promise<void>;
}

const PRUNE_INTERVAL_MS = 10 * 60_000;
const STOP_GRACE_MS = 5_000;

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
    if (config.uploadsDirIsTemp) rmSync(config.uploadsDir, { recursive: true, force: true });
    throw err;
  }
  const ctx: AppContext = { config, db, mail, log, publicUrl: config.publicUrl ?? '', now: () => new Date() };
  let built: { services: Services; seeded: SeedResult | null; app: Express; sessionMiddleware: RequestHandler;
    sessionStore: { prune(): number }; httpServer: Server };
  try {
    const services = createServices(ctx);
    const seeded = await seedIfEmpty(ctx);
    const { app, sessionMiddleware, sessionStore } = buildApp(ctx, services);
    const server = createServer(app);
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject);
      server.listen(config.port, config.host, () => { server.off('error', reject); resolve(); });
    });
    built = { services, seeded, app, sessionMiddleware, sessionStore, httpServer: server };
  } catch (err) {
    await mail.stop();
    db.close();
    if (config.uploadsDirIsTemp) rmSync(config.uploadsDir, { recursive: true, force: true });
    throw err;
  }
  const { services, seeded, app, sessionMiddleware, sessionStore, httpServer } = built;
  const port = (httpServer.address() as AddressInfo).port;
  const url = `http://${urlHost(config.host)}:${port}`;
  ctx.publicUrl = config.publicUrl ?? `http://localhost:${port}`;

  const pruneTimer = setInterval(() => sessionStore.prune(), PRUNE_INTERVAL_MS);
  pruneTimer.unref();

  const hooks: (() => void | Promise<void>)[] = [];
  // Training jobs run in worker threads; on first start the demo study's decoder is trained and frozen in the background.
  if (seeded && config.demoDecoder) {
    services.trainingJobs.queueDemo(seeded.studyId, DEMO_DECODER_NAME, demoDecoderParams(config.demoDecoder));
    log.info('Demo decoder: training in the background; a line follows when it is frozen.');
  }
  services.trainingJobs.start();
  hooks.push(() => services.trainingJobs.stop());
  // Live pilot sessions: WebSockets on this port; the seeded demo rig is served by the embedded bridge.
  if (seeded) markRigEmbedded(db, seeded.rig.id, 'demo-hand-imagery');
  const closeSockets = attachLiveSockets({ httpServer, sessionMiddleware, services, sessions: services.sessions, engine: services.live, log });
  hooks.push(async () => { closeSockets(); await services.live.stop(); });
  let stopping: Promise<void> | null = null;
  async function stop(): Promise<void> {
    stopping ??= (async () => {
      clearInterval(pruneTimer);
      for (const hook of hooks.reverse()) {
        try { await hook(); } catch (err) { log.error('a stop hook failed', err); }
      }
      const closed = new Promise<void>((resolve) => httpServer.close(() => resolve()));
      httpServer.closeIdleConnections();
      // Requests still running after the grace period are cut off.
      const force = setTimeout(() => httpServer.closeAllConnections(), STOP_GRACE_MS);
      await closed;
      clearTimeout(force);
      await mail.stop();
      db.close();
      if (config.uploadsDirIsTemp) rmSync(config.uploadsDir, { recursive: true, force: true });
    })();
    return stopping;
  }

  return {
    url, port, httpServer, app, db, mail, services, sessionMiddleware, config, seeded,
    onStop: (hook) => { hooks.push(hook); },
    stop,
  };
}
