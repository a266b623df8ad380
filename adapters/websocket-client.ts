/**
 * A live stream from an acquisition computer that serves it: a WebSocket client → batches of frames,
 * one Batch per message. It reconnects by itself (exponential backoff with jitter), finds a dead peer
 * with ping/pong, and says each disconnection in the data's own path as a Disconnection record (kept
 * in the session log), which the pipeline turns into Gaps, so filters restart. Timers run on a scheduler.
 */
import { Observable, asyncScheduler, timer, type SchedulerLike, type Subscription } from 'rxjs';
import { WebSocket, type RawData } from 'ws';
import type { Batch, Disconnection, Frame } from '../src/trial/records.ts';
import { MuscleRoster, tooManyMuscles } from '../src/trial/muscle-roster.ts';
import { decodeMessage, MAX_MESSAGE_BYTES, oversizeRejection, type DeviceMapping } from './device-mapping.ts';
import { closeGently, keepAlive, refusalReason } from './socket-care.ts';
import { redactUrl } from './redact-url.ts';
import { DeviceClocks, newConnectionClock, type ConnectionClock } from './device-clocks.ts';

/** What a link is doing, for the screen and the status lines. */
export type LinkEvent =
  | { readonly kind: 'connecting'; readonly url: string; readonly attempt: number }
  | { readonly kind: 'connected'; readonly connection: number; readonly peer: string }
  | { readonly kind: 'disconnected'; readonly connection: number; readonly detail: string }
  | { readonly kind: 'retrying'; readonly inMs: number; readonly attempt: number; readonly detail: string }
  | { readonly kind: 'listening'; readonly url: string; readonly port: number }
  | { readonly kind: 'refused'; readonly peer: string; readonly detail: string }
  /** A device's header declared another device's muscle: that declaration was refused (see MuscleOwners). */
  | { readonly kind: 'conflict'; readonly peer: string; readonly detail: string };

/**
 * The record that says a connection was lost, after the last time it carried; `restoreGaps`
 * (src/pipeline/) turns it into Gaps, live and on every replay of the session log.
 */
export function disconnection(muscles: readonly string[] | null, lastTS: number, detail: string, line: number): Disconnection {
  return { kind: 'disconnection', tS: lastTS, muscles, detail: detail.replace(/[\r\n]+/g, ' '), line };
}

export interface IngestOptions {
  /** Device field names and units; null: the device sends lengthwise-stream records. @default null */
  readonly mapping?: DeviceMapping | null;
  /** Longest message accepted, bytes; a longer one is refused by the socket (close 1009) and counted as line_too_long. */
  readonly maxMessageBytes?: number;
  /** Most distinct muscles one device may carry (the settings' max_muscles_per_trial). @default MAX_MUSCLES_PER_TRIAL */
  readonly maxMuscles?: number;
  /** A step back in a device's clock larger than this (s) at a connection's start is a restart (the settings' clock_reset_min_s). @default CLOCK_RESET_MIN_S */
  readonly clockResetMinS?: number;
}

/**
 * Message decoding shared by the client and the server: counts frames (so frame i of the session is
 * line i, as in the session log), tracks each connection's muscles and last device time.
 */
export class Ingest {
  private nextLine = 1;
  private readonly mapping: DeviceMapping | null;
  private readonly clocks: DeviceClocks;
  readonly maxMessageBytes: number;
  readonly maxMuscles: number | undefined;

  /**
   * @param onePeer a client's one acquisition computer (true), or a server's devices, each known by its
   * muscles (false, the default): whose clock a restarted connection continues (see DeviceClocks).
   * @param nowMs the receive clock, ms.
   */
  constructor(
    options: IngestOptions,
    onePeer = false,
    private readonly nowMs: () => number = Date.now,
  ) {
    this.mapping = options.mapping ?? null;
    this.maxMessageBytes = options.maxMessageBytes ?? MAX_MESSAGE_BYTES;
    this.maxMuscles = options.maxMuscles;
    this.clocks = new DeviceClocks(onePeer, {
      ...(options.maxMuscles !== undefined ? { maxMuscles: options.maxMuscles } : {}),
      ...(options.clockResetMinS !== undefined ? { clockResetMinS: options.clockResetMinS } : {}),
    });
  }

  /** A new connection's track, holding as many muscles as a device may carry. */
  peer(): PeerTrack {
    return newPeerTrack(this.maxMuscles);
  }

  /** One message → its frames, times on the session's timeline; notes muscles and time on `peer`. Never throws. */
  message(data: RawData, peer: PeerTrack): Batch {
    const buffer = Array.isArray(data) ? Buffer.concat(data) : Buffer.isBuffer(data) ? data : Buffer.from(data);
    let frames: Frame[];
    if (buffer.length > this.maxMessageBytes) {
      frames = [oversizeRejection(this.nextLine, buffer.length, this.maxMessageBytes, buffer.toString('utf8', 0, 800))];
    } else {
      frames = decodeMessage(buffer.toString('utf8'), this.nextLine, this.mapping);
    }
    for (let i = 0; i < frames.length; i++) {
      const f = frames[i] as Frame;
      if (f.kind === 'sample' && !peer.muscles.admit(f.muscle)) frames[i] = tooManyMuscles(f, peer.muscles.max, 'device');
    }
    frames = this.clocks.take(frames, peer.clock, this.nowMs(), this.nextLine + frames.length);
    this.nextLine += frames.length;
    for (const f of frames) if ((f.kind === 'sample' || f.kind === 'event') && !(f.tS < peer.lastTS)) peer.lastTS = f.tS;
    return frames;
  }

  /** The socket refused a message over the cap (it closes with 1009): one line_too_long rejection. */
  oversize(): Batch {
    const frame = oversizeRejection(this.nextLine, this.maxMessageBytes + 1, this.maxMessageBytes, '(not kept: the socket refused it unread)');
    this.nextLine++;
    return [{ ...frame, message: frame.message.replace(/^message is \d+ bytes long/, 'message is over the cap') }];
  }

  /** The connection is gone: its Disconnection record. */
  disconnected(peer: PeerTrack, allMuscles: boolean, detail: string): Batch {
    const frame = disconnection(allMuscles ? null : peer.muscles.list(), peer.lastTS, detail, this.nextLine);
    this.nextLine++;
    return [frame];
  }
}

/** What one connection carried so far: its muscles (at most MAX_MUSCLES_PER_TRIAL), its last time, its clock. */
export interface PeerTrack {
  readonly muscles: MuscleRoster;
  lastTS: number;
  readonly clock: ConnectionClock;
}

export function newPeerTrack(maxMuscles?: number): PeerTrack {
  return { muscles: new MuscleRoster(maxMuscles), lastTS: Number.NaN, clock: newConnectionClock() };
}


/** A close code and reason as a short text. */
export function closeDetail(code: number, reason: Buffer | string): string {
  const text = reason.toString().slice(0, 80);
  const names: Record<number, string> = { 1000: 'closed normally', 1001: 'peer going away', 1006: 'connection lost', 1009: 'message too big', 1011: 'peer error' };
  return `code ${code}${names[code] !== undefined ? ` ${names[code]}` : ''}${text.length > 0 ? `: ${text}` : ''}`;
}

export interface BackoffOptions {
  /** Upper bound of the first retry's delay, ms. @default 500 */
  readonly firstMs?: number;
  /** Longest delay, ms. @default 4000 */
  readonly maxMs?: number;
}

/**
 * Delay before reconnection attempt `attempt` (0 for the first retry): the bound doubles from firstMs up
 * to maxMs, and the delay is drawn from its upper half ("equal jitter"), so many clients do not retry in step.
 */
export function backoffDelayMs(attempt: number, random: () => number, options: BackoffOptions = {}): number {
  const firstMs = options.firstMs ?? 500;
  const maxMs = options.maxMs ?? 4000;
  const bound = Math.min(maxMs, firstMs * 2 ** Math.min(attempt, 30));
  const r = Math.min(Math.max(random(), 0), 1 - Number.EPSILON);
  return bound / 2 + (bound / 2) * r;
}

export interface WebSocketClientOptions extends IngestOptions, BackoffOptions {
  /** ws:// or wss:// address of the acquisition computer's stream. */
  readonly url: string;
  /** Timers: backoff, ping. @default asyncScheduler */
  readonly scheduler?: SchedulerLike;
  /** Uniform [0, 1) source of the backoff's jitter. @default Math.random */
  readonly random?: () => number;
  /** A ping every this many ms; no pong (and no message) by the next one: the peer is dead. @default 2000 */
  readonly pingMs?: number;
  /** Extra HTTP headers of the upgrade request (e.g. Authorization). */
  readonly headers?: Readonly<Record<string, string>>;
  /** Link events, for the screen. */
  readonly onLink?: (event: LinkEvent) => void;
}

/**
 * Connects to `url` and emits one Batch per message received, for as long as it is subscribed; never
 * completes by itself. Unsubscribing closes the socket and clears every timer.
 */
export function websocketClient(options: WebSocketClientOptions): Observable<Batch> {
  const scheduler = options.scheduler ?? asyncScheduler;
  const random = options.random ?? Math.random;
  const pingMs = options.pingMs ?? 2000;
  const onLink = options.onLink ?? (() => undefined);
  // Link events go to screens and messages: the address as it may be shown, a token in it hidden.
  const shownUrl = redactUrl(options.url);
  return new Observable<Batch>((subscriber) => {
    const ingest = new Ingest(options, true, () => scheduler.now());
    let socket: WebSocket | null = null;
    let retry: Subscription | null = null;
    let ping: Subscription | null = null;
    let attempt = 0;
    let connection = 0;
    let stopped = false;

    const connect = (): void => {
      retry = null;
      if (stopped) return;
      onLink({ kind: 'connecting', url: shownUrl, attempt });
      const ws = new WebSocket(options.url, {
        maxPayload: ingest.maxMessageBytes,
        skipUTF8Validation: true,
        handshakeTimeout: 5000,
        ...(options.headers !== undefined ? { headers: { ...options.headers } } : {}),
      });
      socket = ws;
      const peer = ingest.peer();
      let opened = false;
      let lastError = '';
      let refused = false;
      // The server answered with an HTTP status of its own (401 without the right token): its reason, in full.
      ws.on('unexpected-response', (_request, response) => {
        void refusalReason(response).then((reason) => {
          refused = true;
          lastError = `the server refused the connection: ${reason}`;
          ws.terminate();
        });
      });
      ws.on('open', () => {
        opened = true;
        attempt = 0;
        connection++;
        onLink({ kind: 'connected', connection, peer: shownUrl });
        ping = keepAlive(ws, pingMs, scheduler, (why) => (lastError = why));
      });
      ws.on('message', (data: RawData) => subscriber.next(ingest.message(data, peer)));
      ws.on('error', (error: Error & { code?: string }) => {
        if (error.code === 'WS_ERR_UNSUPPORTED_MESSAGE_LENGTH') subscriber.next(ingest.oversize());
        if (!refused) lastError = error.message;
      });
      ws.on('close', (code: number, reason: Buffer) => {
        ping?.unsubscribe();
        ping = null;
        socket = null;
        if (stopped) return;
        const detail = lastError !== '' && code === 1006 ? lastError : closeDetail(code, reason);
        if (opened) {
          onLink({ kind: 'disconnected', connection, detail });
          subscriber.next(ingest.disconnected(peer, true, detail));
        }
        const inMs = backoffDelayMs(attempt, random, options);
        onLink({ kind: 'retrying', inMs, attempt, detail });
        attempt++;
        retry = timer(inMs, scheduler).subscribe(connect);
      });
    };

    connect();
    return () => {
      stopped = true;
      retry?.unsubscribe();
      ping?.unsubscribe();
      const ws = socket;
      socket = null;
      if (ws !== null) closeGently(ws, 1000, 'receiver stopping');
    };
  });
}
