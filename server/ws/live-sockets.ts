/**
 * /ws/console?sessionId=N (signed in, session:read) and /ws/display/<token> (one-time token):
 * both only receive. The console gets a hello with the session's detail, then live messages;
 * the display gets `ready` and the session's state, then cues and feedback.
 */
import type { IncomingMessage, ServerResponse } from 'node:http';
import type { Request, Response } from 'express';
import type { WebSocket } from 'ws';
import { can, idParamSchema } from '../../shared/api';
import { LiveCloseCode, type ConsoleMessage, type DisplayMessage } from '../../shared/api/live';
import { displayRateFor } from '../live/display';
import type { LiveSocketDeps } from './index';

/** The signed-in user's id from the login cookie (runs the session middleware on the upgrade request). */
function sessionUserId(req: IncomingMessage, deps: LiveSocketDeps): Promise<number | null> {
  return new Promise((resolve) => {
    const res = {} as ServerResponse;
    deps.sessionMiddleware(req as Request, res as Response, () => {
      const s = (req as Request).session as { passport?: { user?: unknown } } | undefined;
      const id = s?.passport?.user;
      resolve(typeof id === 'number' ? id : null);
    });
  });
}

export async function consoleSocket(ws: WebSocket, req: IncomingMessage, url: URL, deps: LiveSocketDeps): Promise<void> {
  const userId = await sessionUserId(req, deps);
  const user = userId === null ? null : deps.services.auth.sessionUser(userId);
  if (!user) { ws.close(LiveCloseCode.unauthenticated, 'sign in first'); return; }
  if (!can(user.role, 'session:read')) { ws.close(LiveCloseCode.forbidden, 'your role does not allow this'); return; }
  const id = idParamSchema.safeParse(url.searchParams.get('sessionId'));
  if (!id.success) { ws.close(LiveCloseCode.badRequest, 'sessionId must be a session id'); return; }
  let live;
  try { live = deps.sessions.liveSession(id.data); } catch (e) {
    deps.log.error(`console socket for session ${id.data}`, e);
    ws.close(LiveCloseCode.goingAway, 'the session cannot be opened');
    return;
  }
  if (!live) { ws.close(LiveCloseCode.notFound, 'no such session'); return; }
  const decoder = live.session?.decoder;
  const hello: ConsoleMessage = {
    type: 'hello', session: live.detail,
    // Display frames carry the decoder's channels, filtered, at the decimated rate (0 for a stopped session: no frames).
    displayRateHz: decoder ? displayRateFor(decoder.sampleRateHz).rateHz : 0,
    channelNames: decoder ? [...decoder.channelNames] : [],
  };
  ws.send(JSON.stringify(hello));
  if (!live.session) { ws.close(1000, 'session stopped'); return; }
  const hub = live.session.hub;
  hub.consoles.add(ws);
  ws.on('close', () => hub.consoles.delete(ws));
  ws.on('error', () => hub.consoles.delete(ws));
}

export function displaySocket(ws: WebSocket, token: string, deps: LiveSocketDeps): void {
  let session;
  try { session = deps.sessions.useDisplayToken(token); } catch (e) {
    deps.log.error('display socket', e);
    session = null;
  }
  if (!session) { ws.close(LiveCloseCode.forbidden, 'this display link is unknown, used or expired'); return; }
  const send = (m: DisplayMessage) => ws.send(JSON.stringify(m));
  send({ type: 'ready', classes: [...session.decoder.classes] });
  send({ type: 'state', status: session.status });
  const hub = session.hub;
  hub.displays.add(ws);
  ws.on('close', () => hub.displays.delete(ws));
  ws.on('error', () => hub.displays.delete(ws));
}
