/**
 * Broadcast to a session's console and participant-display sockets with bounded buffers.
 * Display frames (binary, high rate) are dropped for a client whose socket buffer holds more than
 * DROP_DISPLAY_BYTES; JSON messages (cues, trials, status: low rate) are always queued, and a
 * client whose buffer passes MAX_BUFFER_BYTES is closed. Nothing here ever waits on a client, so
 * a slow browser cannot hold up ingest.
 */
import { LiveCloseCode, type ConsoleMessage, type DisplayMessage } from '../../shared/api/live';

/** What the hub needs of a socket (the ws WebSocket fits). */
export interface LiveClient {
  readonly bufferedAmount: number;
  send(data: string | Uint8Array): void;
  close(code: number, reason: string): void;
}

export const DROP_DISPLAY_BYTES = 1 << 20;
export const MAX_BUFFER_BYTES = 16 << 20;

export class SessionHub {
  readonly consoles = new Set<LiveClient>();
  readonly displays = new Set<LiveClient>();
  /** Display frames dropped for slow consoles. */
  droppedFrames = 0;

  get watched(): boolean { return this.consoles.size > 0; }

  private deliver(set: Set<LiveClient>, data: string | Uint8Array): void {
    for (const c of set) {
      if (c.bufferedAmount > MAX_BUFFER_BYTES) {
        set.delete(c);
        c.close(LiveCloseCode.goingAway, 'client too slow');
        continue;
      }
      try { c.send(data); } catch { set.delete(c); }
    }
  }

  console(msg: ConsoleMessage): void {
    if (this.consoles.size > 0) this.deliver(this.consoles, JSON.stringify(msg));
  }

  /** A preserialised console message (sent to several places). */
  consoleText(text: string): void {
    if (this.consoles.size > 0) this.deliver(this.consoles, text);
  }

  displayFrame(bytes: Uint8Array): void {
    for (const c of this.consoles) {
      if (c.bufferedAmount > DROP_DISPLAY_BYTES) { this.droppedFrames++; continue; }
      try { c.send(bytes); } catch { this.consoles.delete(c); }
    }
  }

  display(msg: DisplayMessage): void {
    if (this.displays.size > 0) this.deliver(this.displays, JSON.stringify(msg));
  }

  closeAll(code: number, reason: string): void {
    for (const c of [...this.consoles, ...this.displays]) c.close(code, reason);
    this.consoles.clear();
    this.displays.clear();
  }

  closeDisplays(code: number, reason: string): void {
    for (const c of this.displays) c.close(code, reason);
    this.displays.clear();
  }
}
