// A small feed server for the bridge tests: ws on /ws/feed, rig-key check on the upgrade
// request, one FeedAcceptor per bridge session, everything "stored" in memory and committed at
// once. Knobs let a test drop connections mid-stream, hold back ACKs, or turn connections away.
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { WebSocketServer, type WebSocket } from 'ws';
import {
  decodeFrame, FEED_LIMITS, FeedAcceptor, FeedCloseCode, type ChunkFrame, type CueFrame, type GapFrame,
} from '../../shared/protocol';

export interface StoredSession {
  acceptor: FeedAcceptor;
  chunks: ChunkFrame[];
  gaps: Array<{ fromSample: number; toSample: number; reason: GapFrame['reason'] }>;
  cues: CueFrame[];
  duplicates: number;
  connections: number;
  /** The connection currently feeding this session. */
  active: WebSocket | null;
}

export interface AcceptorServer {
  url: string;
  sessions: Map<string, StoredSession>;
  /** Terminates a connection after `counts[0]` data frames, the next after `counts[1]` more, ... */
  dropAfter(...counts: number[]): void;
  /** While true, new connections are closed at once with 4503 (retry later). */
  turnAway: boolean;
  /** When > 0, each drop of `dropAfter` also turns new connections away for this many ms. */
  turnAwayAfterDropMs: number;
  /** Send an ACK only every n-th data frame (each is still committed at once). */
  ackEvery: number;
  close(): Promise<void>;
}

export async function startAcceptorServer(rigKey: string): Promise<AcceptorServer> {
  const http: Server = createServer((_req, res) => { res.statusCode = 404; res.end(); });
  const wss = new WebSocketServer({
    server: http, path: '/ws/feed', maxPayload: FEED_LIMITS.maxFrameBytes,
    verifyClient: (info, cb) => {
      const auth = info.req.headers.authorization ?? '';
      // docs/feed-protocol.md: "Authorization: Rig <key>" on the upgrade request.
      if (auth === `Rig ${rigKey}`) cb(true);
      else cb(false, 401, 'Unauthorized');
    },
  });
  const sessions = new Map<string, StoredSession>();
  const drops: number[] = [];
  let dropIn: number | null = null;
  const server: AcceptorServer = {
    url: '',
    sessions,
    dropAfter(...counts) { drops.push(...counts); dropIn ??= drops.shift() ?? null; },
    turnAway: false,
    turnAwayAfterDropMs: 0,
    ackEvery: 1,
    close: () => new Promise<void>((resolve) => {
      for (const c of wss.clients) c.terminate();
      wss.close(() => http.close(() => resolve()));
    }),
  };

  wss.on('connection', (ws: WebSocket) => {
    if (server.turnAway) { ws.close(FeedCloseCode.goingAway, 'busy, retry later'); return; }
    let session: StoredSession | null = null;
    let sinceAck = 0;
    let flush: ReturnType<typeof setTimeout> | null = null;
    ws.on('message', (data: Buffer) => {
      if (!session) {
        let key: string;
        try {
          const f = decodeFrame(data);
          key = f.type === 'hello' ? `${f.rigId}/${f.bridgeSessionId}` : '?';
        } catch { key = '?'; }
        session = sessions.get(key) ?? { acceptor: new FeedAcceptor(), chunks: [], gaps: [], cues: [], duplicates: 0, connections: 0, active: null };
        if (key !== '?') sessions.set(key, session);
        session.connections++;
        // A session resumes on a new connection while the old one may not have closed yet:
        // retire the old one first (docs/feed-protocol.md, resume).
        if (session.active) { session.active.terminate(); session.acceptor.disconnect(); }
        session.active = ws;
      }
      const s = session;
      const ev = s.acceptor.receive(data);
      switch (ev.kind) {
        case 'hello': ws.send(ev.reply); return;
        case 'keepalive': ws.send(ev.reply); return;
        case 'duplicate': s.duplicates++; ws.send(ev.reply); return;
        case 'refuse': ws.send(ev.reply); ws.close(ev.code, ev.reason); return;
        case 'chunk': s.chunks.push(ev.frame); break;
        case 'cue': s.cues.push(ev.frame); break;
        case 'gap': if (ev.toSample > ev.fromSample) s.gaps.push({ fromSample: ev.fromSample, toSample: ev.toSample, reason: ev.frame.reason }); break;
      }
      const ack = s.acceptor.commit(ev.seq);
      if (flush) clearTimeout(flush);
      flush = null;
      if (++sinceAck >= server.ackEvery) { ws.send(ack); sinceAck = 0; }
      // Held-back ACKs still go out once the feed pauses, as a batching server's would.
      else flush = setTimeout(() => { if (ws.readyState === ws.OPEN) ws.send(s.acceptor.commit(s.acceptor.lastDurableSeq)); sinceAck = 0; }, 30);
      if (dropIn !== null && --dropIn <= 0) {
        dropIn = drops.shift() ?? null;
        if (server.turnAwayAfterDropMs > 0) {
          server.turnAway = true;
          setTimeout(() => { server.turnAway = false; }, server.turnAwayAfterDropMs);
        }
        ws.terminate();
      }
    });
    ws.on('close', () => {
      if (session && session.active === ws) { session.active = null; session.acceptor.disconnect(); }
    });
  });

  await new Promise<void>((resolve) => http.listen(0, '127.0.0.1', resolve));
  server.url = `http://127.0.0.1:${(http.address() as AddressInfo).port}`;
  return server;
}
