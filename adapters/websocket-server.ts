/**
 * A live stream from devices that push: a WebSocket server → batches of frames, one Batch per message,
 * from any number of devices at once (each its own muscles). Binds 127.0.0.1 unless told otherwise;
 * with a token, an upgrade without it is refused with 401; a message over the cap is refused by the
 * socket with close code 1009 and counted as line_too_long. A device's disconnection is a Disconnection
 * record naming the muscles it carried, so only their filters restart (the other devices' go on).
 * A device's header sets sides only for its own muscles: another's declaration is refused (MuscleOwners).
 */
import { timingSafeEqual } from 'node:crypto';
import type { IncomingMessage } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Observable, asyncScheduler, type SchedulerLike, type Subscription } from 'rxjs';
import { WebSocket, WebSocketServer, type RawData } from 'ws';
import type { Batch } from '../src/trial/records.ts';
import { closeDetail, Ingest, type IngestOptions, type LinkEvent } from './websocket-client.ts';
import { closeGently, keepAlive } from './socket-care.ts';
import { conflictText, MuscleOwners } from './muscle-owners.ts';

/** Largest message a pushing device may send, bytes. */
export const SERVER_MAX_PAYLOAD_BYTES = 256 * 1024;

export interface WebSocketServerOptions extends IngestOptions {
  /** @default '127.0.0.1' */
  readonly host?: string;
  /** 0: any free port (the `listening` link event says which). */
  readonly port: number;
  /** When given, a device must send `Authorization: Bearer TOKEN` or `?token=TOKEN`. */
  readonly token?: string;
  /** A ping to each device every this many ms; no pong (and no message) by the next one: dropped. @default 2000 */
  readonly pingMs?: number;
  /** Timers. @default asyncScheduler */
  readonly scheduler?: SchedulerLike;
  readonly onLink?: (event: LinkEvent) => void;
}

/** The server could not listen (port in use, address not on this machine…). */
export class ListenError extends Error {
  override readonly name = 'ListenError';
  readonly code: string;
  constructor(host: string, port: number, code: string) {
    const hint =
      code === 'EADDRINUSE'
        ? 'another program listens there; give another port, or 0 for any free port'
        : code === 'EADDRNOTAVAIL'
          ? 'that address is not one of this machine\'s; give 127.0.0.1, 0.0.0.0 or one of its own addresses'
          : code === 'EACCES'
            ? 'ports below 1024 need privileges; give a port from 1024 up'
            : 'check the host and port';
    super(`cannot listen on ${host}:${port} (${code}): ${hint}`);
    this.code = code;
  }
}

function sameText(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

/** `Bearer CREDENTIALS`, the scheme in any letter case (an HTTP authentication scheme is case-insensitive). */
const BEARER = /^\s*bearer +(\S.*)$/i;

/** True when the upgrade request carries the token, in the Authorization header or the query. */
export function hasToken(request: IncomingMessage, token: string): boolean {
  const auth = request.headers.authorization;
  const bearer = typeof auth === 'string' ? BEARER.exec(auth) : null;
  if (bearer !== null && sameText((bearer[1] ?? '').trim(), token)) return true;
  const query = new URL(request.url ?? '/', 'ws://localhost').searchParams.get('token');
  return query !== null && sameText(query, token);
}

function peerName(request: IncomingMessage): string {
  const a = request.socket.remoteAddress ?? '?';
  return `${a.includes(':') ? `[${a}]` : a}:${request.socket.remotePort ?? '?'}`;
}

/**
 * Listens and emits one Batch per message of any device, for as long as it is subscribed. Errors with
 * a ListenError when it cannot listen. Unsubscribing closes every connection (1001) and the server.
 */
export function websocketServer(options: WebSocketServerOptions): Observable<Batch> {
  const host = options.host ?? '127.0.0.1';
  const scheduler = options.scheduler ?? asyncScheduler;
  const pingMs = options.pingMs ?? 2000;
  const onLink = options.onLink ?? (() => undefined);
  return new Observable<Batch>((subscriber) => {
    const ingest = new Ingest({ ...options, maxMessageBytes: options.maxMessageBytes ?? SERVER_MAX_PAYLOAD_BYTES }, false, () => scheduler.now());
    const owners = new MuscleOwners();
    let connection = 0;
    let stopped = false;
    const token = options.token;
    const server = new WebSocketServer({
      host,
      port: options.port,
      maxPayload: ingest.maxMessageBytes,
      skipUTF8Validation: true,
      clientTracking: true,
      ...(token !== undefined
        ? {
            verifyClient: (info: { req: IncomingMessage }, done: (ok: boolean, code?: number, message?: string) => void) => {
              if (hasToken(info.req, token)) done(true);
              else {
                onLink({ kind: 'refused', peer: peerName(info.req), detail: 'no valid token (401)' });
                done(false, 401, 'Unauthorized: send "Authorization: Bearer TOKEN" or ?token=TOKEN');
              }
            },
          }
        : {}),
    });
    const pings = new Set<Subscription>();

    server.on('listening', () => {
      const address = server.address() as AddressInfo;
      const shown = address.family === 'IPv6' ? `[${address.address}]` : address.address;
      onLink({ kind: 'listening', url: `ws://${shown}:${address.port}`, port: address.port });
    });
    server.on('error', (error: NodeJS.ErrnoException) => {
      subscriber.error(new ListenError(host, options.port, error.code ?? 'EUNKNOWN'));
    });
    server.on('connection', (ws: WebSocket, request: IncomingMessage) => {
      const number = ++connection;
      const peer = ingest.peer();
      const name = peerName(request);
      let lastError = '';
      onLink({ kind: 'connected', connection: number, peer: name });
      const ping = keepAlive(ws, pingMs, scheduler, (why) => (lastError = why));
      pings.add(ping);
      ws.on('message', (data: RawData) => {
        const checked = owners.check(number, ingest.message(data, peer));
        for (const c of checked.conflicts) onLink({ kind: 'conflict', peer: name, detail: conflictText(c, name) });
        subscriber.next(checked.frames);
      });
      ws.on('error', (error: Error & { code?: string }) => {
        if (error.code === 'WS_ERR_UNSUPPORTED_MESSAGE_LENGTH') subscriber.next(ingest.oversize());
        lastError = error.message;
      });
      ws.on('close', (code: number, reason: Buffer) => {
        ping.unsubscribe();
        pings.delete(ping);
        owners.release(number);
        if (stopped) return;
        const detail = `device ${number} (${name}) ${lastError !== '' && code === 1006 ? lastError : closeDetail(code, reason)}`;
        onLink({ kind: 'disconnected', connection: number, detail });
        subscriber.next(ingest.disconnected(peer, false, detail));
      });
    });

    return () => {
      stopped = true;
      for (const p of pings) p.unsubscribe();
      pings.clear();
      for (const ws of server.clients) closeGently(ws, 1001, 'receiver stopping');
      server.close();
    };
  });
}
