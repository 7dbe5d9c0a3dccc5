/**
 * /ws/feed: a bridge authenticates with `Authorization: Rig <key>`; its binary messages go to
 * ingest (server/live/ingest.ts) as one more connection of that rig. A bad key is refused with a
 * REFUSE frame and close code 4401.
 */
import type { IncomingMessage } from 'node:http';
import type { RawData, WebSocket } from 'ws';
import { encodeRefuse, FeedCloseCode } from '../../shared/protocol';
import type { LiveSocketDeps } from './index';

function bytesOf(data: RawData): Uint8Array {
  if (Array.isArray(data)) return new Uint8Array(Buffer.concat(data));
  if (data instanceof ArrayBuffer) return new Uint8Array(data);
  return new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
}

export function feedSocket(ws: WebSocket, req: IncomingMessage, deps: LiveSocketDeps): void {
  const m = /^Rig\s+(\S+)\s*$/.exec(req.headers.authorization ?? '');
  const rig = m ? deps.services.rigs.verifyRigKey(m[1]!) : null;
  if (!rig) {
    const reason = 'unknown or retired rig key';
    ws.send(encodeRefuse({ type: 'refuse', code: FeedCloseCode.unauthorized, reason }));
    ws.close(FeedCloseCode.unauthorized, reason);
    return;
  }
  const conn = deps.engine.ingest.connect(rig.id, {
    send: (b) => { if (ws.readyState === ws.OPEN) ws.send(b); },
    close: (code, reason) => ws.close(code, reason),
    pause: () => ws.pause(),
    resume: () => ws.resume(),
  });
  ws.on('message', (data, isBinary) => {
    const arrivalNs = process.hrtime.bigint();
    if (!isBinary) { conn.refuse(FeedCloseCode.badFrame, 'text messages are not part of the feed protocol'); return; }
    conn.receive(bytesOf(data), arrivalNs);
  });
  ws.on('close', () => conn.onClose());
  ws.on('error', (e) => deps.log.error(`feed socket of rig ${rig.id}`, e));
}
