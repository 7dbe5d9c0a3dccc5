/**
 * The WebSocket routes on the HTTP server's port: /ws/feed (bridges, rig key), /ws/console
 * (signed-in users, login cookie) and /ws/display/<token> (the participant display, one-time
 * token). A refusal is a close code plus a reason, after the upgrade, so every client sees why.
 */
import type { IncomingMessage, Server } from 'node:http';
import type { Duplex } from 'node:stream';
import type { RequestHandler } from 'express';
import { WebSocketServer, type WebSocket } from 'ws';
import { FEED_LIMITS } from '../../shared/protocol';
import type { Logger } from '../log';
import type { Services } from '../services';
import type { LiveEngine } from '../live/engine';
import type { SessionService } from '../services/sessions';
import { consoleSocket, displaySocket } from './live-sockets';
import { feedSocket } from './feed';

/** Ping interval; a socket that missed a whole interval's pong is dropped. */
const PING_MS = 15_000;

export interface LiveSocketDeps {
  httpServer: Server;
  sessionMiddleware: RequestHandler;
  services: Services;
  sessions: SessionService;
  engine: LiveEngine;
  log: Logger;
}

/** Attaches the upgrade handler; returns a function that closes every socket. */
export function attachLiveSockets(deps: LiveSocketDeps): () => void {
  const feedServer = new WebSocketServer({ noServer: true, maxPayload: FEED_LIMITS.maxFrameBytes });
  // Clients of the console and display send nothing: a small limit.
  const liveServer = new WebSocketServer({ noServer: true, maxPayload: 4096 });
  const alive = new WeakMap<WebSocket, boolean>();

  const track = (ws: WebSocket) => {
    alive.set(ws, true);
    ws.on('pong', () => alive.set(ws, true));
  };

  const onUpgrade = (req: IncomingMessage, socket: Duplex, head: Buffer) => {
    const url = new URL(req.url ?? '/', 'http://localhost');
    const path = url.pathname;
    if (path === '/ws/feed') {
      feedServer.handleUpgrade(req, socket, head, (ws) => { track(ws); feedSocket(ws, req, deps); });
    } else if (path === '/ws/console') {
      liveServer.handleUpgrade(req, socket, head, (ws) => { track(ws); void consoleSocket(ws, req, url, deps); });
    } else if (path.startsWith('/ws/display/')) {
      liveServer.handleUpgrade(req, socket, head, (ws) => { track(ws); displaySocket(ws, decodeURIComponent(path.slice(12)), deps); });
    } else {
      socket.end('HTTP/1.1 404 Not Found\r\nConnection: close\r\nContent-Length: 0\r\n\r\n');
    }
  };
  deps.httpServer.on('upgrade', onUpgrade);

  const pinger = setInterval(() => {
    for (const server of [feedServer, liveServer]) {
      for (const ws of server.clients) {
        if (!alive.get(ws)) { ws.terminate(); continue; }
        alive.set(ws, false);
        ws.ping();
      }
    }
  }, PING_MS);
  pinger.unref();

  return () => {
    clearInterval(pinger);
    deps.httpServer.off('upgrade', onUpgrade);
    for (const server of [feedServer, liveServer]) {
      for (const ws of server.clients) ws.terminate();
      server.close();
    }
  };
}
