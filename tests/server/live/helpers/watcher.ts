/** Console and display sockets for the live tests: sign-in cookie, and a client that keeps every message. */
import request from 'supertest';
import WebSocket from 'ws';
import { decodeDisplayFrame, type ConsoleMessage, type DisplayFrame, type DisplayMessage } from '../../../../shared/api/live';
import type { ServerHandle } from '../../../../server/index';
import { DEMO_PASSWORD } from '../../helpers/server';

/** The login cookie of a signed-in user (name=value), for a WebSocket upgrade. */
export async function loginCookie(h: ServerHandle, email: string): Promise<string> {
  const first = await request(h.url).get('/api/auth/csrf').expect(200);
  const c1 = String(first.headers['set-cookie']?.[0] ?? '').split(';')[0]!;
  const login = await request(h.url).post('/api/auth/login').set('Cookie', c1).set('X-CSRF-Token', first.body.token as string)
    .send({ email, password: DEMO_PASSWORD }).expect(200);
  const c2 = login.headers['set-cookie']?.[0];
  return c2 ? String(c2).split(';')[0]! : c1;
}

export class Watcher<M> {
  readonly messages: M[] = [];
  readonly frames: DisplayFrame[] = [];
  closed: { code: number; reason: string } | null = null;
  private waiters: Array<() => void> = [];

  private constructor(readonly ws: WebSocket) {
    ws.on('message', (data: Buffer, isBinary: boolean) => {
      if (isBinary) this.frames.push(decodeDisplayFrame(new Uint8Array(data)));
      else this.messages.push(JSON.parse(data.toString()) as M);
      this.wake();
    });
    ws.on('close', (code, reason) => { this.closed = { code, reason: reason.toString() }; this.wake(); });
  }

  static open<M>(h: ServerHandle, path: string, cookie?: string): Promise<Watcher<M>> {
    const ws = new WebSocket(`${h.url.replace(/^http/, 'ws')}${path}`, cookie ? { headers: { Cookie: cookie } } : {});
    const w = new Watcher<M>(ws);
    return new Promise((resolve, reject) => { ws.once('open', () => resolve(w)); ws.once('error', reject); });
  }

  private wake(): void { for (const f of this.waiters.splice(0)) f(); }

  until(pred: () => boolean, ms = 10_000, what = 'condition'): Promise<void> {
    if (pred()) return Promise.resolve();
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => reject(new Error(`timed out waiting for ${what}`)), ms);
      const check = () => { if (pred()) { clearTimeout(timer); resolve(); } else this.waiters.push(check); };
      this.waiters.push(check);
    });
  }

  of<T extends string>(type: T): Extract<M, { type: T }>[] {
    return this.messages.filter((m) => (m as { type: string }).type === type) as Extract<M, { type: T }>[];
  }

  close(): void { this.ws.close(); }
}

export type ConsoleWatcher = Watcher<ConsoleMessage>;
export type DisplayWatcher = Watcher<DisplayMessage>;
