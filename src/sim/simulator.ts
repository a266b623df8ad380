/**
 * A simulated device on a WebSocket: serves (startSimulator) or pushes (pushSimulator) the generator's
 * synthetic gait stream in real time, batching records into messages as a device would (one JSON array
 * per message slice, or a single object when a slice holds one record). With faults on it also sends
 * malformed messages, drops connections, restarts (header resent, clock jumped forward), jumps its clock
 * and stalls then bursts. It counts what it sent, so tests can check that accepted equals sent.
 */
import { WebSocket, WebSocketServer } from 'ws';
import type { AddressInfo } from 'node:net';
import { performance } from 'node:perf_hooks';
import type { RejectReason } from '../trial/reasons.ts';
import { REJECT_REASONS } from '../trial/reasons.ts';
import { badLineNdjson, ORDER_REASONS, roundTime } from './bad-lines.ts';
import { createFeed, lastSampleOf, type Feed } from './feed.ts';
import type { DropoutSpec, Scenario, TrialSpec } from './gait-generator.ts';
import { DEFAULT_MUSCLES, scenarioSpec } from './scenarios.ts';
import { isWireEvent, isWireMarker, isWireSample, type WireHeader, type WireRecord } from './wire.ts';
import { ndjsonLine } from './writers.ts';
import { refusalReason } from '../../adapters/socket-care.ts';

export const FAULT_KINDS = ['malformed', 'burst', 'time_jump', 'resent_header', 'disconnect', 'device_restart'] as const;
export type FaultKind = (typeof FAULT_KINDS)[number];

export interface FaultOptions {
  /** Wall seconds between faults. @default 3 */
  readonly everyS?: number;
  /** The faults to cycle through, in order. @default FAULT_KINDS */
  readonly kinds?: readonly FaultKind[];
  /** Malformed messages to cycle through, in order. @default every rejection reason */
  readonly reasons?: readonly RejectReason[];
}

export interface SimulatorOptions {
  /** @default 'walk' */
  readonly scenario?: Scenario;
  /** @default 100 */
  readonly rateHz?: number;
  /** @default ['calf', 'thigh'] */
  readonly muscles?: readonly string[];
  /** @default 1 */
  readonly seed?: number;
  /** Wall seconds until the simulator stops by itself, counted from its first connection; undefined: until stop(). */
  readonly durationS?: number;
  /** With a duration: wall seconds to wait for a first connection before stopping without one. @default durationS */
  readonly firstConnectionWithinS?: number;
  /** true or options: inject faults; also adds repeating tracking dropouts to the trial. @default false */
  readonly faults?: boolean | FaultOptions;
  /** Wall milliseconds of stream per message. @default 40 */
  readonly messageMs?: number;
  /** Device seconds per wall second. @default 1 */
  readonly speed?: number;
  /** One line per thing done (connections, faults); the command prints them on stderr. */
  readonly log?: (line: string) => void;
  /** The receiver's muscle cap (the settings' max_muscles_per_trial): a too_many_muscles fault declares one more. @default MAX_MUSCLES_PER_TRIAL */
  readonly maxMuscles?: number;
}

export interface ServeOptions extends SimulatorOptions {
  /** @default '127.0.0.1' */
  readonly host?: string;
  /** 0: an ephemeral port. @default 0 */
  readonly port?: number;
}

export interface PushOptions extends SimulatorOptions {
  /** ws:// or wss:// address of a receiving server. */
  readonly url: string;
  /** The address as lines and `url` show it (a token in it hidden). @default url */
  readonly shownUrl?: string;
  /** Sent with every connection as "Authorization: Bearer TOKEN". */
  readonly token?: string;
  /** Wall milliseconds before reconnecting after a connection ends. @default 500 */
  readonly reconnectMs?: number;
}

/** What went out, over all connections (a record sent to two clients counts twice). */
export interface SimulatorStats {
  connections: number;
  messagesSent: number;
  /** Valid samples sent (low-quality ones included); the receiver should accept exactly these. */
  samplesSent: number;
  eventsSent: number;
  markersSent: number;
  headersSent: number;
  /** Malformed messages sent, by the reason the receiver should give. */
  badSent: Partial<Record<RejectReason, number>>;
  /** Samples a slow receiver did not get because its send buffer was full (never counted as sent). */
  samplesDropped: number;
  faults: Partial<Record<FaultKind, number>>;
}

export interface RunningSimulator {
  /** ws:// address: where it listens (serve) or what it pushes to (push). */
  readonly url: string;
  /** Listening port; 0 when pushing. */
  readonly port: number;
  readonly stats: Readonly<SimulatorStats>;
  /** Valid records sent: samples, gait events, markers and headers. */
  readonly sentRecords: number;
  /** Valid samples sent. */
  readonly sentSamples: number;
  /** Open connections now. */
  readonly openConnections: number;
  /** Why the server refused the connection (its HTTP status and reason), when it did; pushing stops then. */
  readonly refusal: string | null;
  /** Settles when the simulator has stopped (duration over, or stop()) and every socket is closed. */
  readonly done: Promise<void>;
  /** Stops sending, closes every connection (code 1000) and the server; idempotent. */
  stop(): Promise<void>;
}

/** The simulator could not start (address in use, bad address…); the message says how to fix it. */
export class SimulatorError extends Error {
  override readonly name = 'SimulatorError';
}

/** Beyond this much unsent data a receiver is treated as too slow and the batch is dropped for it. */
const MAX_BUFFERED_BYTES = 8 * 1024 * 1024;
const BURST_HOLD_S = 0.6;
const RESTART_SILENCE_S = 0.5;
const RESTART_JUMP_S = 5;
const TIME_JUMP_S = 2;

interface Transport {
  sockets(): Iterable<WebSocket>;
  /** The disconnect fault: drop the connection(s) now. */
  disconnect(): number;
  close(): Promise<void>;
}

/** Problems of the options, as sentences; empty when they are usable. */
export function checkSimulatorOptions(o: SimulatorOptions): string[] {
  const problems: string[] = [];
  if (o.rateHz !== undefined && !(o.rateHz >= 1 && o.rateHz <= 2000)) problems.push(`rate ${o.rateHz} Hz: give 1–2000 Hz`);
  if (o.durationS !== undefined && !(o.durationS > 0)) problems.push(`duration ${o.durationS} s: give a duration above 0 s`);
  if (o.firstConnectionWithinS !== undefined && !(o.firstConnectionWithinS > 0)) problems.push(`first connection within ${o.firstConnectionWithinS} s: give a time above 0 s`);
  if (o.messageMs !== undefined && !(o.messageMs >= 1 && o.messageMs <= 1000)) problems.push(`message slice ${o.messageMs} ms: give 1–1000 ms`);
  if (o.speed !== undefined && !(o.speed > 0 && o.speed <= 1000)) problems.push(`speed ${o.speed}: give above 0 and at most 1000`);
  if (o.muscles !== undefined) {
    if (o.muscles.length === 0) problems.push('no muscles: give at least one name');
    if (new Set(o.muscles).size !== o.muscles.length) problems.push('a muscle name appears twice: give each once');
    if (o.muscles.some((m) => m.length === 0)) problems.push('an empty muscle name: give every muscle a name');
  }
  if (typeof o.faults === 'object' && o.faults.everyS !== undefined && !(o.faults.everyS > 0)) {
    problems.push(`fault interval ${o.faults.everyS} s: give above 0 s`);
  }
  return problems;
}

function trialSpecFor(o: SimulatorOptions): TrialSpec {
  const scenario = o.scenario ?? 'walk';
  const muscles = o.muscles ?? DEFAULT_MUSCLES;
  const base = scenarioSpec(scenario, {
    seed: o.seed ?? 1,
    rateHz: o.rateHz ?? 100,
    durationS: o.durationS === undefined ? Infinity : o.durationS * (o.speed ?? 1) + 1,
    muscles,
    header: { subject: 'SYN-000', trial: `live-${scenario}`, calibrate: 'all' },
  });
  if (o.faults === undefined || o.faults === false) return base;
  const dropouts: DropoutSpec[] = [{ muscle: muscles[0] as string, fromS: 7, toS: 7.4, mode: 'low_quality', repeatEveryS: 20 }];
  if (muscles[1] !== undefined) dropouts.push({ muscle: muscles[1], fromS: 13, toS: 13.3, mode: 'missing', repeatEveryS: 27 });
  return { ...base, dropouts };
}

function emptyStats(): SimulatorStats {
  return {
    connections: 0,
    messagesSent: 0,
    samplesSent: 0,
    eventsSent: 0,
    markersSent: 0,
    headersSent: 0,
    badSent: {},
    samplesDropped: 0,
    faults: {},
  };
}

interface BatchCounts {
  readonly samples: number;
  readonly events: number;
  readonly markers: number;
}

function countBatch(batch: readonly WireRecord[]): BatchCounts {
  let samples = 0;
  let events = 0;
  let markers = 0;
  for (const r of batch) {
    if (isWireSample(r)) samples++;
    else if (isWireEvent(r)) events++;
    else if (isWireMarker(r)) markers++;
  }
  return { samples, events, markers };
}

function messageText(batch: readonly WireRecord[]): string {
  if (batch.length === 1) return ndjsonLine(batch[0] as WireRecord);
  let text = '[';
  for (let i = 0; i < batch.length; i++) text += (i === 0 ? '' : ',') + ndjsonLine(batch[i] as WireRecord);
  return `${text}]`;
}

/** The core shared by both directions: pacing, faults, counting. */
class Engine {
  readonly stats = emptyStats();
  readonly feed: Feed;
  private transport: Transport | null = null;
  private readonly log: (line: string) => void;
  private readonly messageMs: number;
  private readonly speed: number;
  private readonly durationS: number | undefined;
  private readonly faultEveryS: number;
  private readonly faultKinds: readonly FaultKind[];
  private readonly faultReasons: readonly RejectReason[];
  private readonly faultsOn: boolean;
  private startMs = 0;
  private tickNo = 0;
  private timer: NodeJS.Timeout | null = null;
  private nextFaultS: number;
  private faultIdx = 0;
  private reasonIdx = 0;
  private holdUntilS = -1;
  private readonly held: WireRecord[][] = [];
  private silentUntilS = -1;
  private restartPending = false;
  private pendingMalformed: RejectReason | null = null;
  private stopping: Promise<void> | null = null;
  private resolveDone: () => void = () => {};
  readonly done: Promise<void>;

  constructor(private readonly options: SimulatorOptions) {
    this.feed = createFeed(trialSpecFor(options));
    this.log = options.log ?? (() => {});
    this.messageMs = options.messageMs ?? 40;
    this.speed = options.speed ?? 1;
    this.durationS = options.durationS;
    const f = typeof options.faults === 'object' ? options.faults : {};
    this.faultsOn = options.faults !== undefined && options.faults !== false;
    this.faultEveryS = f.everyS ?? 3;
    this.faultKinds = f.kinds ?? FAULT_KINDS;
    this.faultReasons = f.reasons ?? REJECT_REASONS;
    this.nextFaultS = this.faultEveryS;
    this.done = new Promise((resolve) => {
      this.resolveDone = resolve;
    });
  }

  get header(): WireHeader | null {
    return this.feed.header;
  }

  /** Seconds since the stream started (0 before its first connection). */
  elapsedS(): number {
    return this.startMs === 0 ? 0 : (performance.now() - this.startMs) / 1000;
  }

  stamp(): string {
    return `[${this.elapsedS().toFixed(1)} s]`;
  }

  /** Where the stream goes; nothing is sent before start(). With a duration and no connection within it (or within firstConnectionWithinS), it stops. */
  attach(transport: Transport): void {
    this.transport = transport;
    if (this.durationS !== undefined) {
      this.timer = setTimeout(() => void this.stop(), (this.options.firstConnectionWithinS ?? this.durationS) * 1000);
    }
  }

  /** Starts the stream's clock (and its faults): called at the first connection, so no receiver misses its start. */
  start(): void {
    if (this.startMs !== 0 || this.stopping !== null) return;
    if (this.timer !== null) clearTimeout(this.timer);
    this.startMs = performance.now();
    this.schedule();
  }

  private schedule(): void {
    this.tickNo++;
    const due = this.startMs + this.tickNo * this.messageMs;
    this.timer = setTimeout(() => this.onTick(), Math.max(0, due - performance.now()));
  }

  /** Sends a text message to one socket when it can take it; false when it was not sent. */
  private sendTo(ws: WebSocket, text: string): boolean {
    if (ws.readyState !== WebSocket.OPEN) return false;
    ws.send(text);
    this.stats.messagesSent++;
    return true;
  }

  sendHeader(ws: WebSocket): void {
    const h = this.feed.header;
    if (h !== null && this.sendTo(ws, JSON.stringify(h))) this.stats.headersSent++;
  }

  private broadcastHeader(): void {
    for (const ws of this.transport?.sockets() ?? []) this.sendHeader(ws);
  }

  private sendBatch(batch: readonly WireRecord[]): void {
    if (batch.length === 0) return;
    const counts = countBatch(batch);
    const text = messageText(batch);
    for (const ws of this.transport?.sockets() ?? []) {
      if (ws.readyState !== WebSocket.OPEN) continue;
      if (ws.bufferedAmount > MAX_BUFFERED_BYTES) {
        this.stats.samplesDropped += counts.samples;
        continue;
      }
      if (!this.sendTo(ws, text)) continue;
      this.stats.samplesSent += counts.samples;
      this.stats.eventsSent += counts.events;
      this.stats.markersSent += counts.markers;
    }
  }

  /** A malformed message right after a batch, so copies of a sample copy one every receiver has seen. */
  private sendMalformed(reason: RejectReason, after: readonly WireRecord[]): boolean {
    const muscles = this.feed.trial.spec.muscles;
    const name = muscles[this.reasonIdx % muscles.length]?.name ?? (muscles[0]?.name as string);
    const last = lastSampleOf(after, name);
    if (ORDER_REASONS.includes(reason) && last === null) return false;
    const ref = after.length > 0 ? (after[after.length - 1] as WireRecord) : null;
    const tS = ref !== null && 't' in ref ? roundTime(ref.t + 0.5 / this.feed.trial.spec.rateHz) : this.feed.offsetS;
    const text = badLineNdjson(reason, {
      tS,
      muscle: name,
      last,
      variant: this.reasonIdx,
      longLineChars: this.feed.trial.spec.longLineChars,
      ...(this.options.maxMuscles !== undefined ? { maxMuscles: this.options.maxMuscles } : {}),
    });
    if (text === null) return false;
    let sent = 0;
    for (const ws of this.transport?.sockets() ?? []) if (this.sendTo(ws, text)) sent++;
    this.stats.badSent[reason] = (this.stats.badSent[reason] ?? 0) + sent;
    this.log(`${this.stamp()} fault malformed: sent a message the receiver should reject as ${reason} (to ${sent} connection${sent === 1 ? '' : 's'})`);
    return true;
  }

  private applyFault(kind: FaultKind, nowS: number): void {
    this.stats.faults[kind] = (this.stats.faults[kind] ?? 0) + 1;
    switch (kind) {
      case 'malformed':
        this.pendingMalformed = this.faultReasons[this.reasonIdx % this.faultReasons.length] ?? 'not_json';
        this.reasonIdx++;
        return;
      case 'burst':
        this.holdUntilS = nowS + BURST_HOLD_S;
        this.log(`${this.stamp()} fault burst: holding messages for ${BURST_HOLD_S} s, then sending them all at once`);
        return;
      case 'time_jump':
        this.feed.jump(TIME_JUMP_S);
        this.log(`${this.stamp()} fault time_jump: the device clock jumps forward ${TIME_JUMP_S} s`);
        return;
      case 'resent_header':
        this.broadcastHeader();
        this.log(`${this.stamp()} fault resent_header: the header is sent again mid-stream`);
        return;
      case 'disconnect': {
        const n = this.transport?.disconnect() ?? 0;
        this.log(`${this.stamp()} fault disconnect: dropping ${n} connection${n === 1 ? '' : 's'}`);
        return;
      }
      case 'device_restart':
        this.silentUntilS = nowS + RESTART_SILENCE_S;
        this.restartPending = true;
        this.log(
          `${this.stamp()} fault device_restart: silent for ${RESTART_SILENCE_S} s, then the header again and the clock ${RESTART_JUMP_S} s ahead`,
        );
        return;
    }
  }

  private onTick(): void {
    this.timer = null;
    const nowS = this.elapsedS();
    if (this.durationS !== undefined && nowS >= this.durationS) {
      void this.stop();
      return;
    }
    if (this.faultsOn) {
      while (nowS >= this.nextFaultS) {
        this.applyFault(this.faultKinds[this.faultIdx % this.faultKinds.length] ?? 'malformed', nowS);
        this.faultIdx++;
        this.nextFaultS += this.faultEveryS;
      }
    }
    if (this.restartPending && nowS >= this.silentUntilS) {
      this.restartPending = false;
      this.feed.jump(RESTART_JUMP_S);
      this.broadcastHeader();
      this.log(`${this.stamp()} device back after restart: header resent, clock now ${RESTART_JUMP_S} s ahead`);
    }
    const batch = this.feed.pull(nowS * this.speed);
    if (nowS < this.silentUntilS) {
      // The device is restarting: what it measured meanwhile is lost.
    } else if (nowS < this.holdUntilS) {
      if (batch.length > 0) this.held.push(batch);
    } else {
      this.flushHeld();
      this.sendBatch(batch);
      if (this.pendingMalformed !== null && this.sendMalformed(this.pendingMalformed, batch)) this.pendingMalformed = null;
    }
    if (this.feed.ended && this.held.length === 0) {
      void this.stop();
      return;
    }
    this.schedule();
  }

  private flushHeld(): void {
    if (this.held.length === 0) return;
    const n = this.held.length;
    for (const b of this.held.splice(0)) this.sendBatch(b);
    this.log(`${this.stamp()} burst: sent ${n} held messages at once`);
  }

  stop(): Promise<void> {
    if (this.stopping === null) {
      if (this.timer !== null) clearTimeout(this.timer);
      this.timer = null;
      this.flushHeld();
      this.stopping = (this.transport?.close() ?? Promise.resolve()).then(() => this.resolveDone());
    }
    return this.stopping;
  }

  isStopping(): boolean {
    return this.stopping !== null;
  }
}

function running(engine: Engine, url: string, port: number, open: () => number, refusal: () => string | null = () => null): RunningSimulator {
  return {
    url,
    port,
    get refusal() {
      return refusal();
    },
    stats: engine.stats,
    get sentRecords() {
      const s = engine.stats;
      return s.samplesSent + s.eventsSent + s.markersSent + s.headersSent;
    },
    get sentSamples() {
      return engine.stats.samplesSent;
    },
    get openConnections() {
      return open();
    },
    done: engine.done,
    stop: () => engine.stop(),
  };
}

function closeSocket(ws: WebSocket, code: number, reason: string): Promise<void> {
  if (ws.readyState === WebSocket.CLOSED) return Promise.resolve();
  return new Promise((resolve) => {
    const timer = setTimeout(() => {
      ws.terminate();
      resolve();
    }, 2000);
    ws.once('close', () => {
      clearTimeout(timer);
      resolve();
    });
    if (ws.readyState === WebSocket.CONNECTING) ws.terminate();
    else ws.close(code, reason);
  });
}

/** Serves the stream: every client that connects gets the header, then the live stream from that moment. */
export async function startSimulator(options: ServeOptions = {}): Promise<RunningSimulator> {
  const problems = checkSimulatorOptions(options);
  if (problems.length > 0) throw new SimulatorError(`cannot start the simulator: ${problems.join('; ')}`);
  const host = options.host ?? '127.0.0.1';
  const engine = new Engine(options);
  const wss = new WebSocketServer({ host, port: options.port ?? 0 });
  await new Promise<void>((resolve, reject) => {
    const onError = (error: NodeJS.ErrnoException): void => {
      wss.close();
      reject(
        new SimulatorError(
          `cannot listen on ${host}:${options.port ?? 0} (${error.code ?? error.message}): ` +
            'choose another port, or stop what is using it, or give a host this machine has',
        ),
      );
    };
    wss.once('error', onError);
    wss.once('listening', () => {
      wss.off('error', onError);
      resolve();
    });
  });
  const log = options.log ?? (() => {});
  wss.on('error', (error) => log(`server error: ${error.message}`));
  const address = wss.address() as AddressInfo;
  const hostInUrl = address.family === 'IPv6' ? `[${address.address}]` : address.address;
  const url = `ws://${hostInUrl}:${address.port}`;
  const clients = new Set<WebSocket>();
  let nextId = 1;

  wss.on('connection', (ws, req) => {
    if (engine.isStopping()) {
      ws.close(1001, 'simulator stopping');
      return;
    }
    const id = nextId++;
    clients.add(ws);
    engine.stats.connections++;
    engine.start();
    log(`${engine.stamp()} client ${id} connected from ${req.socket.remoteAddress ?? '?'}:${req.socket.remotePort ?? '?'}`);
    ws.on('error', () => {});
    ws.on('close', (code) => {
      clients.delete(ws);
      if (!engine.isStopping()) log(`${engine.stamp()} client ${id} disconnected (code ${code})`);
    });
    // Incoming messages are ignored: a device only talks.
    engine.sendHeader(ws);
  });

  engine.attach({
    sockets: () => clients,
    disconnect: () => {
      const n = clients.size;
      for (const ws of clients) ws.close(1001, 'simulated disconnect');
      return n;
    },
    close: async () => {
      await Promise.all([...clients].map((ws) => closeSocket(ws, 1000, 'end of simulated stream')));
      await new Promise<void>((resolve) => wss.close(() => resolve()));
    },
  });
  return running(engine, url, address.port, () => clients.size);
}

/** Pushes the stream to a server, reconnecting after every lost connection until it stops. */
export async function pushSimulator(options: PushOptions): Promise<RunningSimulator> {
  const problems = checkSimulatorOptions(options);
  if (!/^wss?:\/\/[^/\s]+/.test(options.url)) problems.push(`address "${options.url}": give a ws:// or wss:// address, e.g. ws://127.0.0.1:8080`);
  if (problems.length > 0) throw new SimulatorError(`cannot start the simulator: ${problems.join('; ')}`);
  const engine = new Engine(options);
  const log = options.log ?? (() => {});
  const reconnectMs = options.reconnectMs ?? 500;
  const shown = options.shownUrl ?? options.url;
  let ws: WebSocket | null = null;
  let reconnectTimer: NodeJS.Timeout | null = null;
  let lastError = '';
  let refusal: string | null = null;

  const connect = (): void => {
    reconnectTimer = null;
    if (engine.isStopping()) return;
    const socket = new WebSocket(options.url, options.token !== undefined ? { headers: { Authorization: `Bearer ${options.token}` } } : {});
    ws = socket;
    // The server answered the upgrade with an HTTP status of its own (401 without the right token): a
    // refusal, said with its reason; connecting again the same way would be refused again, so pushing stops.
    socket.on('unexpected-response', (_request, response) => {
      void refusalReason(response).then((reason) => {
        refusal = `${shown} refused the connection: ${reason}`;
        log(`${engine.stamp()} ${refusal}`);
        if (ws === socket) ws = null;
        void engine.stop();
        socket.terminate();
      });
    });
    socket.on('open', () => {
      engine.stats.connections++;
      engine.start();
      lastError = '';
      log(`${engine.stamp()} connected to ${shown}`);
      engine.sendHeader(socket);
    });
    socket.on('error', (error) => {
      // Ending while a connection is being made closes it early on purpose: not a problem to report.
      if (engine.isStopping()) return;
      if (error.message !== lastError) log(`${engine.stamp()} connection problem: ${error.message}`);
      lastError = error.message;
    });
    socket.on('close', (code) => {
      if (ws === socket) ws = null;
      if (engine.isStopping()) return;
      log(`${engine.stamp()} connection closed (code ${code}); reconnecting in ${reconnectMs} ms`);
      reconnectTimer = setTimeout(connect, reconnectMs);
    });
  };

  engine.attach({
    sockets: () => (ws === null ? [] : [ws]),
    disconnect: () => {
      if (ws === null || ws.readyState !== WebSocket.OPEN) return 0;
      ws.close(1001, 'simulated disconnect');
      return 1;
    },
    close: async () => {
      if (reconnectTimer !== null) clearTimeout(reconnectTimer);
      reconnectTimer = null;
      if (ws !== null) await closeSocket(ws, 1000, 'end of simulated stream');
    },
  });
  connect();
  return running(engine, shown, 0, () => (ws !== null && ws.readyState === WebSocket.OPEN ? 1 : 0), () => refusal);
}
