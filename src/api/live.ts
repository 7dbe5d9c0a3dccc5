/**
 * The app's WebSockets, on the same origin as the page: the console feed of one session
 * (signed-in, cookie session) and the participant display (one-time token, no account).
 */

/** Something that opens a socket; tests pass a fake. */
export type SocketFactory = (url: string) => WebSocket;

export const openSocket: SocketFactory = (url) => new WebSocket(url);

function wsBase(): string {
  return `${location.protocol === 'https:' ? 'wss' : 'ws'}://${location.host}`;
}

export function consoleSocketUrl(sessionId: number): string {
  return `${wsBase()}/ws/console?sessionId=${sessionId}`;
}

export function displaySocketUrl(token: string): string {
  return `${wsBase()}/ws/display/${encodeURIComponent(token)}`;
}
