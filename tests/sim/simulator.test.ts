import { createServer } from 'node:net';
import { afterEach, describe, expect, it } from 'vitest';
import { WebSocket, WebSocketServer } from 'ws';
import { from, lastValueFrom, reduce } from 'rxjs';
import { parseMessage } from '../../adapters/parse-record.ts';
import { orderPerMuscle } from '../../src/pipeline/order-per-muscle.ts';
import type { Batch } from '../../src/trial/records.ts';
import { REJECT_REASONS } from '../../src/trial/reasons.ts';
import { pushSimulator, SimulatorError, startSimulator, type RunningSimulator } from '../../src/sim/simulator.ts';
import { createCollector, type Collector } from './ws-collector.ts';
import { until } from '../adapters/ws-peers.ts';

const started: RunningSimulator[] = [];
const servers: WebSocketServer[] = [];

afterEach(async () => {
  await Promise.all(started.splice(0).map((s) => s.stop()));
  await Promise.all(servers.splice(0).map((s) => new Promise<void>((resolve) => s.close(() => resolve()))));
});

async function serve(options: Parameters<typeof startSimulator>[0]): Promise<RunningSimulator> {
  const sim = await startSimulator(options);
  started.push(sim);
  return sim;
}

/** A client that reconnects after each close until told to stop; resolves once it has closed for good. */
function client(url: string, collector: Collector, reconnect: boolean): { finished: Promise<void>; stop: () => void } {
  let stopped = false;
  let resolveFinished: () => void = () => {};
  const finished = new Promise<void>((resolve) => {
    resolveFinished = resolve;
  });
  const open = (): void => {
    const ws = new WebSocket(url);
    ws.on('message', (data) => collector.take(String(data)));
    ws.on('error', () => {});
    ws.on('close', (code) => {
      collector.received.closeCodes.push(code);
      if (code === 1000 || stopped || !reconnect) resolveFinished();
      else setTimeout(open, 50);
    });
  };
  open();
  return {
    finished,
    stop: () => {
      stopped = true;
    },
  };
}

function strictlyIncreasing(times: readonly number[]): boolean {
  return times.every((t, i) => i === 0 || t > (times[i - 1] as number));
}

function badCounts(reasons: readonly string[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const r of reasons) out[r] = (out[r] ?? 0) + 1;
  return out;
}

describe('startSimulator', () => {
  it('sends a connecting client the header, then arrays of valid records, and closes it with 1000 at the end', async () => {
    const sim = await serve({ durationS: 1 });
    expect(sim.url).toMatch(/^ws:\/\/127\.0\.0\.1:\d+$/);
    const first: string[] = [];
    const collector = createCollector();
    const ws = new WebSocket(sim.url);
    ws.on('message', (data) => {
      if (first.length < 2) first.push(String(data));
      collector.take(String(data));
    });
    const closed = new Promise<number>((resolve) => ws.on('close', (code) => resolve(code)));
    await sim.done;
    expect(await closed).toBe(1000);
    expect(JSON.parse(first[0] as string)).toMatchObject({ format: 'lengthwise-stream', version: 1, rate_hz: 100 });
    expect(Array.isArray(JSON.parse(first[1] as string))).toBe(true);
    const r = collector.received;
    expect(r.bad).toEqual([]);
    expect(r.headers).toBe(1);
    expect(r.samples).toBe(sim.sentSamples);
    expect(r.samples).toBeGreaterThan(100);
    expect(r.samples + r.events + r.markers + r.headers).toBe(sim.sentRecords);
    expect([...r.timesByMuscle.keys()].sort()).toEqual(['calf', 'thigh']);
    for (const times of r.timesByMuscle.values()) expect(strictlyIncreasing(times)).toBe(true);
  });

  it('sends nothing and counts nothing when no client connects', async () => {
    const sim = await serve({ durationS: 0.2 });
    await sim.done;
    expect(sim.stats).toMatchObject({ connections: 0, messagesSent: 0, samplesSent: 0, headersSent: 0 });
  });

  it('waits firstConnectionWithinS for a late receiver, then streams its whole duration to it', async () => {
    const sim = await serve({ durationS: 0.3, firstConnectionWithinS: 30 });
    await new Promise((resolve) => setTimeout(resolve, 600));
    const collector = createCollector();
    const c = client(sim.url, collector, false);
    await sim.done;
    await c.finished;
    expect(sim.stats.connections).toBe(1);
    expect(collector.received.samples).toBe(sim.sentSamples);
    expect(collector.received.samples).toBeGreaterThan(0);
  });

  it('gives every one of several clients the header and the same stream', async () => {
    const sim = await serve({ durationS: 0.6, muscles: ['a', 'b', 'c'], rateHz: 50 });
    const collectors = [createCollector(), createCollector()];
    const clients = collectors.map((c) => client(sim.url, c, false));
    await sim.done;
    await Promise.all(clients.map((c) => c.finished));
    for (const c of collectors) {
      expect(c.received.headers).toBe(1);
      expect([...c.received.timesByMuscle.keys()].sort()).toEqual(['a', 'b', 'c']);
    }
    expect(collectors[0]?.received.samples).toBeGreaterThan(0);
    expect((collectors[0]?.received.samples ?? 0) + (collectors[1]?.received.samples ?? 0)).toBe(sim.sentSamples);
  });

  it('sends malformed messages of every rejection reason with --faults, each counted by the reason it reads as', async () => {
    // Until a message of every reason has gone out, however slowly the machine runs the stream's clock.
    const sim = await serve({ faults: { everyS: 0.1, kinds: ['malformed'] } });
    const collector = createCollector();
    const c = client(sim.url, collector, false);
    await until(() => REJECT_REASONS.every((reason) => (sim.stats.badSent[reason] ?? 0) > 0), 30_000, 'a malformed message of every reason');
    await sim.stop();
    await c.finished;
    const r = collector.received;
    expect(badCounts(r.bad)).toEqual(sim.stats.badSent);
    for (const reason of REJECT_REASONS) expect(r.bad).toContain(reason);
    expect(r.samples).toBe(sim.sentSamples);
  });

  it('survives every fault: what a reconnecting client accepts equals what was sent, and valid times only move forward', async () => {
    const lines: string[] = [];
    const sim = await serve({ faults: { everyS: 0.15 }, log: (l) => lines.push(l) });
    const collector = createCollector();
    const c = client(sim.url, collector, true);
    // Until every kind of fault has happened once, however slowly the machine runs the stream's clock.
    const kinds = ['malformed', 'burst', 'time_jump', 'resent_header', 'disconnect', 'device_restart'] as const;
    // …and the restart has sent its header again after its silence.
    await until(
      () => kinds.every((kind) => (sim.stats.faults[kind] ?? 0) > 0) && sim.stats.headersSent >= sim.stats.connections + 2,
      30_000,
      'every kind of fault, the restart included',
    );
    await sim.stop();
    c.stop();
    await c.finished;
    const r = collector.received;
    expect(r.samples).toBe(sim.sentSamples);
    expect(r.headers).toBe(sim.stats.headersSent);
    expect(badCounts(r.bad)).toEqual(sim.stats.badSent);
    expect(sim.stats.connections).toBeGreaterThanOrEqual(2);
    expect(r.closeCodes).toContain(1001);
    for (const kind of ['malformed', 'burst', 'time_jump', 'resent_header', 'disconnect', 'device_restart']) {
      expect(sim.stats.faults[kind as keyof typeof sim.stats.faults]).toBeGreaterThanOrEqual(1);
      expect(lines.some((l) => l.includes(`fault ${kind}`))).toBe(true);
    }
    // Headers: one per connection, one per resent_header, one per restart.
    expect(r.headers).toBeGreaterThanOrEqual(sim.stats.connections + 2);
    for (const times of r.timesByMuscle.values()) {
      expect(strictlyIncreasing(times)).toBe(true);
      const steps = times.slice(1).map((t, i) => t - (times[i] as number));
      // The time jump (2 s) and the restart (5 s, plus its silence) show as forward steps.
      expect(Math.max(...steps)).toBeGreaterThan(2);
    }
  });

  it('is read by the tool\'s message parser and per-muscle ordering exactly as counted: accepted = sent, rejected = malformed sent', async () => {
    const sim = await serve({ durationS: 2.2, faults: { everyS: 0.1 } });
    const texts: string[] = [];
    const c = client(sim.url, { received: createCollector().received, take: (t) => texts.push(t) }, true);
    await sim.done;
    c.stop();
    await c.finished;
    let line = 1;
    const batches: Batch[] = texts.map((text) => {
      const frames = parseMessage(text, line);
      line += Math.max(1, frames.length);
      return frames;
    });
    const frames = await lastValueFrom(from(batches).pipe(orderPerMuscle(), reduce((all: Batch, b) => (all.push(...b), all), [])));
    const rejected = badCounts(frames.flatMap((f) => (f.kind === 'rejection' ? [f.reason] : [])));
    expect(frames.filter((f) => f.kind === 'sample')).toHaveLength(sim.sentSamples);
    expect(rejected).toEqual(sim.stats.badSent);
    expect(frames.filter((f) => f.kind === 'header')).toHaveLength(sim.stats.headersSent);
  });

  it('stops early on stop(): done settles, the client is closed and the port is free', async () => {
    const sim = await serve({});
    const collector = createCollector();
    const c = client(sim.url, collector, false);
    await new Promise((resolve) => setTimeout(resolve, 200));
    await sim.stop();
    await sim.done;
    await c.finished;
    expect(collector.received.closeCodes).toEqual([1000]);
    expect(sim.openConnections).toBe(0);
    const refused = await new Promise<boolean>((resolve) => {
      const ws = new WebSocket(sim.url);
      ws.on('open', () => resolve(false));
      ws.on('error', () => resolve(true));
    });
    expect(refused).toBe(true);
    await sim.stop();
  });

  it('rejects unusable options and a port in use with a SimulatorError saying what to change', async () => {
    await expect(startSimulator({ rateHz: 0 })).rejects.toThrow(/rate 0 Hz: give 1–2000 Hz/);
    await expect(startSimulator({ muscles: ['a', 'a'] })).rejects.toThrow(SimulatorError);
    const blocker = createServer();
    await new Promise<void>((resolve) => blocker.listen(0, '127.0.0.1', () => resolve()));
    const port = (blocker.address() as { port: number }).port;
    try {
      await expect(startSimulator({ port })).rejects.toThrow(/EADDRINUSE.*choose another port/);
    } finally {
      await new Promise<void>((resolve) => blocker.close(() => resolve()));
    }
  });
});

describe('pushSimulator', () => {
  async function receiver(): Promise<{ url: string; collector: Collector; wss: WebSocketServer; dropFirst: () => void }> {
    const wss = new WebSocketServer({ host: '127.0.0.1', port: 0 });
    servers.push(wss);
    await new Promise<void>((resolve) => wss.once('listening', () => resolve()));
    const collector = createCollector();
    wss.on('connection', (ws) => {
      ws.on('message', (data) => collector.take(String(data)));
    });
    const dropFirst = (): void => {
      for (const ws of wss.clients) ws.close(1012, 'receiver restarting');
    };
    return { url: `ws://127.0.0.1:${(wss.address() as { port: number }).port}`, collector, wss, dropFirst };
  }

  it('pushes the header and the stream to a server, and what arrives equals what was sent', async () => {
    const { url, collector } = await receiver();
    const sim = await pushSimulator({ url, durationS: 1, scenario: 'run' });
    started.push(sim);
    await sim.done;
    await until(() => collector.received.samples >= sim.sentSamples, 10_000, 'every sample sent to arrive');
    expect(collector.received.headers).toBe(1);
    expect(collector.received.bad).toEqual([]);
    expect(collector.received.samples).toBe(sim.sentSamples);
    expect(sim.sentSamples).toBeGreaterThan(100);
  });

  it('reconnects when the server drops it, sending the header again', async () => {
    const lines: string[] = [];
    const { url, collector, dropFirst } = await receiver();
    const sim = await pushSimulator({ url, durationS: 1.2, reconnectMs: 100, log: (l) => lines.push(l) });
    started.push(sim);
    setTimeout(dropFirst, 400);
    await sim.done;
    await until(() => collector.received.samples >= sim.sentSamples, 10_000, 'every sample sent to arrive');
    expect(sim.stats.connections).toBe(2);
    expect(collector.received.headers).toBe(2);
    expect(collector.received.samples).toBe(sim.sentSamples);
    expect(lines.some((l) => l.includes('connection closed (code 1012); reconnecting in 100 ms'))).toBe(true);
  });

  it('keeps trying a server that is not there, and says so once', async () => {
    const lines: string[] = [];
    const blocker = createServer();
    await new Promise<void>((resolve) => blocker.listen(0, '127.0.0.1', () => resolve()));
    const port = (blocker.address() as { port: number }).port;
    await new Promise<void>((resolve) => blocker.close(() => resolve()));
    const sim = await pushSimulator({ url: `ws://127.0.0.1:${port}`, durationS: 0.5, reconnectMs: 50, log: (l) => lines.push(l) });
    await sim.done;
    expect(sim.stats.connections).toBe(0);
    expect(lines.filter((l) => l.includes('connection problem')).length).toBe(1);
    expect(lines.filter((l) => l.includes('reconnecting')).length).toBeGreaterThan(1);
  });

  it('rejects an address that is not ws:// or wss://', async () => {
    await expect(pushSimulator({ url: 'http://127.0.0.1:1' })).rejects.toThrow(/give a ws:\/\/ or wss:\/\/ address/);
  });
});
