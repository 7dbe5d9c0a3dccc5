import { describe, expect, it } from 'vitest';
import { DROP_DISPLAY_BYTES, MAX_BUFFER_BYTES, SessionHub, type LiveClient } from '../../../server/live/hub';

function client(bufferedAmount: number): LiveClient & { sent: Array<string | Uint8Array>; closedWith: number | null } {
  const c = {
    bufferedAmount, sent: [] as Array<string | Uint8Array>, closedWith: null as number | null,
    send(d: string | Uint8Array) { c.sent.push(d); },
    close(code: number) { c.closedWith = code; },
  };
  return c;
}

describe('the session hub', () => {
  it('drops display frames for a console whose socket buffer is full, but still sends it trials and cues', () => {
    const hub = new SessionHub();
    const fast = client(0), slow = client(DROP_DISPLAY_BYTES + 1);
    hub.consoles.add(fast);
    hub.consoles.add(slow);
    hub.displayFrame(new Uint8Array(28));
    hub.console({ type: 'cue', cueId: 1, sampleIndex: 10, classLabel: 'left-hand' });
    // Issue 6 (brief): drop display frames for slow clients; never block ingest.
    expect(fast.sent).toHaveLength(2);
    expect(slow.sent).toHaveLength(1);
    expect(typeof slow.sent[0]).toBe('string');
    expect(hub.droppedFrames).toBe(1);
  });

  it('closes a client whose buffer passes the bound instead of queueing without limit', () => {
    const hub = new SessionHub();
    const stuck = client(MAX_BUFFER_BYTES + 1);
    hub.displays.add(stuck);
    hub.display({ type: 'state', status: 'running' });
    // Bounded buffers: the stuck client is closed with LiveCloseCode.goingAway and forgotten.
    expect(stuck.closedWith).toBe(4503);
    expect(hub.displays.size).toBe(0);
  });
});
