/**
 * What the WebSocket client and server both do to a socket: find a dead peer, close without hanging,
 * and say why a server refused a connection.
 */
import type { IncomingMessage } from 'node:http';
import { interval, type SchedulerLike, type Subscription } from 'rxjs';
import { WebSocket } from 'ws';

/**
 * Pings the peer every `pingMs`; a peer that has sent neither a pong nor a message by the next ping is
 * dead: `onDead` is told why and the socket is cut. Unsubscribe to stop (its listeners go too).
 */
export function keepAlive(ws: WebSocket, pingMs: number, scheduler: SchedulerLike, onDead: (why: string) => void): Subscription {
  let alive = true;
  const seen = (): void => {
    alive = true;
  };
  ws.on('pong', seen);
  ws.on('message', seen);
  const pinging = interval(pingMs, scheduler).subscribe(() => {
    if (!alive) {
      onDead(`no answer to ping within ${pingMs} ms`);
      ws.terminate();
      return;
    }
    alive = false;
    ws.ping();
  });
  pinging.add(() => {
    ws.off('pong', seen);
    ws.off('message', seen);
  });
  return pinging;
}

/** Closes with a code and reason; a peer that does not answer the closing handshake within 1 s is cut off, so the process can end. */
export function closeGently(ws: WebSocket, code: number, reason: string): void {
  ws.on('error', () => undefined);
  if (ws.readyState !== WebSocket.OPEN) {
    ws.terminate();
    return;
  }
  ws.close(code, reason);
  const cut = setTimeout(() => ws.terminate(), 1000);
  cut.unref();
  ws.on('close', () => clearTimeout(cut));
}

/** Longest part of a refusal's body kept in its reason, characters. */
const REFUSAL_BODY_CHARS = 300;

/**
 * Why a server answered a WebSocket upgrade with an HTTP status of its own (401 without the right
 * token): "HTTP 401 Unauthorized: BODY", the body's start on one line. Never rejects.
 */
export async function refusalReason(response: IncomingMessage): Promise<string> {
  let body = '';
  try {
    for await (const chunk of response as AsyncIterable<Buffer>) {
      body += chunk.toString('utf8');
      if (body.length > REFUSAL_BODY_CHARS) break;
    }
  } catch {
    // The body is a courtesy: the status alone says it.
  }
  const text = body.replace(/\s+/g, ' ').trim().slice(0, REFUSAL_BODY_CHARS);
  return `HTTP ${response.statusCode ?? '?'} ${response.statusMessage ?? ''}`.trim() + (text.length > 0 ? `: ${text}` : '');
}
