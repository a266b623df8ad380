import fc from 'fast-check';
import { afterEach, describe, expect, it } from 'vitest';
import type { Subscription } from 'rxjs';
import {
  backoffDelayMs,
  websocketClient,
  type LinkEvent,
} from '../../adapters/websocket-client.ts';
import { createPrng } from '../../src/sim/prng.ts';
import type { Batch, Frame } from '../../src/trial/records.ts';
import { flat, killServer, nextConnection, sampleTexts, sendAll, silentPeer, until, wsServer } from './ws-peers.ts';

const cleanups: (() => unknown)[] = [];
afterEach(async () => {
  while (cleanups.length > 0) await cleanups.pop()?.();
});

function subscribeClient(url: string, extra: Partial<Parameters<typeof websocketClient>[0]> = {}) {
  const batches: Batch[] = [];
  const links: LinkEvent[] = [];
  const errors: unknown[] = [];
  const sub: Subscription = websocketClient({
    url,
    random: createPrng(7).next,
    onLink: (e) => links.push(e),
    ...extra,
  }).subscribe({ next: (b) => batches.push(b), error: (e) => errors.push(e) });
  cleanups.push(() => sub.unsubscribe());
  return { batches, links, errors, sub, frames: (): Frame[] => flat(batches) };
}

function samples(frames: readonly Frame[]): number {
  return frames.filter((f) => f.kind === 'sample').length;
}

async function server() {
  const s = await wsServer();
  cleanups.push(() => killServer(s.server));
  return s;
}

describe('backoffDelayMs', () => {
  it('retries first within 0.5 s, doubles the bound, and stays under the cap', () => {
    fc.assert(
      fc.property(fc.nat(100), fc.double({ min: 0, max: 1, noNaN: true }), (attempt, r) => {
        const d = backoffDelayMs(attempt, () => r);
        const bound = Math.min(4000, 500 * 2 ** attempt);
        expect(d).toBeGreaterThanOrEqual(bound / 2);
        expect(d).toBeLessThan(bound);
        expect(d).toBeLessThan(attempt === 0 ? 500 : 4000);
      }),
    );
  });

  it('gives the same delays for the same seed, and spreads two seeds apart', () => {
    const run = (seed: number) => {
      const random = createPrng(seed).next;
      return [0, 1, 2, 3, 4, 5].map((a) => backoffDelayMs(a, random));
    };
    expect(run(3)).toEqual(run(3));
    expect(run(3)).not.toEqual(run(4));
  });
});

describe('websocketClient', () => {
  it('says a refused upgrade with the server\'s status and reason, and hides a token of its URL in link events', async () => {
    const { WebSocketServer } = await import('ws');
    const refusing = new WebSocketServer({ host: '127.0.0.1', port: 0, verifyClient: (_info, done) => done(false, 401, 'Unauthorized: the lab token is needed') });
    await new Promise<void>((resolve) => refusing.once('listening', () => resolve()));
    cleanups.push(() => new Promise<void>((resolve) => refusing.close(() => resolve())));
    const port = (refusing.address() as { port: number }).port;
    const c = subscribeClient(`ws://127.0.0.1:${port}/?token=sekrit`);
    await until(() => c.links.some((e) => e.kind === 'retrying'), 5000, 'the first retry');
    const retry = c.links.find((e) => e.kind === 'retrying');
    expect(retry).toMatchObject({ detail: 'the server refused the connection: HTTP 401 Unauthorized: Unauthorized: the lab token is needed' });
    expect(c.links[0]).toEqual({ kind: 'connecting', url: `ws://127.0.0.1:${port}/?token=***`, attempt: 0 });
    expect(JSON.stringify(c.links)).not.toContain('sekrit');
    expect(c.frames()).toEqual([]);
  });

  it('emits nothing before a message and one batch per message, with every valid sample sent', async () => {
    const { server: s, url } = await server();
    const connected = nextConnection(s);
    const client = subscribeClient(url);
    const peer = await connected;
    expect(client.batches).toEqual([]);
    const texts = sampleTexts(120);
    // One message of one record, then arrays of ten (devices batch).
    const messages = [texts[0] as string];
    for (let i = 1; i < 120; i += 10) messages.push(`[${texts.slice(i, Math.min(120, i + 10)).join(',')}]`);
    await sendAll(peer, messages);
    await until(() => samples(client.frames()) === 120, 4000, '120 samples');
    expect(client.batches).toHaveLength(messages.length);
    // Frame i of the session is line i (as in the session log).
    expect(client.frames().map((f) => (f.kind === 'sample' ? f.line : -1))).toEqual(texts.map((_, i) => i + 1));
  });

  it('rejects malformed messages with their reasons and goes on', async () => {
    const { server: s, url } = await server();
    const connected = nextConnection(s);
    const client = subscribeClient(url);
    const peer = await connected;
    const bad: [string | Buffer, string][] = [
      ['{"t": 0.01, "muscle": "calf", "fascicle_mm": 52', 'not_json'],
      ['{"t": 1, "muscle": "calf", "fascicle_mm": -3}', 'out_of_range'],
      ['{"t": 1, "event": "jump", "side": "left"}', 'unknown_event'],
      ['{"t": 1, "muscle": "calf", "fascicle_mm": 50, "__proto__": {"x": 1}}', 'unsafe_key'],
      [`{"a": ${'['.repeat(20)}${']'.repeat(20)}}`, 'too_deep'],
      ['{"t": "soon", "muscle": "calf", "fascicle_mm": 50}', 'schema'],
      ['NaN', 'not_json'],
      ['{"t": 1e999, "muscle": "calf", "fascicle_mm": 50}', 'out_of_range'],
      [Buffer.from([0xff, 0xfe, 0x00, 0x81, 0x7b]), 'not_json'],
      [Buffer.from([0xc3, 0x28, 0x7b, 0x22]), 'not_json'],
    ];
    await sendAll(peer, [...bad.map(([m]) => m), sampleTexts(1, 'calf', 5)[0] as string]);
    await until(() => client.batches.length === bad.length + 1, 4000, 'every message');
    const reasons = client.frames().map((f) => (f.kind === 'rejection' ? f.reason : f.kind));
    expect(reasons).toEqual([...bad.map(([, r]) => r), 'sample']);
    expect(client.errors).toEqual([]);
  });

  it('accepts a header resent on every connection', async () => {
    const { server: s, url } = await server();
    const client = subscribeClient(url);
    const header = JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'left' } } });
    s.on('connection', (ws) => ws.send(header));
    await until(() => client.frames().some((f) => f.kind === 'header'), 4000, 'the header');
    for (const ws of s.clients) ws.terminate();
    await until(() => client.frames().filter((f) => f.kind === 'header').length === 2, 4000, 'the header again');
    expect(client.frames().filter((f) => f.kind === 'rejection')).toEqual([]);
  });

  it('reconnects after the server is killed and restarted, with one disconnection record per lost connection', async () => {
    const first = await wsServer();
    const port = first.port;
    let connected = nextConnection(first.server);
    const client = subscribeClient(first.url);
    let peer = await connected;
    await sendAll(peer, sampleTexts(50, 'calf', 0));
    await until(() => samples(client.frames()) === 50, 4000, 'the first 50');
    await killServer(first.server);
    await until(() => client.links.some((e) => e.kind === 'disconnected'), 4000, 'the disconnection');
    // Nothing listens for a while: the client keeps retrying.
    await until(() => client.links.filter((e) => e.kind === 'retrying').length >= 2, 5000, 'two retries');
    const retries = client.links.filter((e) => e.kind === 'retrying');
    expect(retries.length).toBeGreaterThanOrEqual(2);
    expect(retries[0]?.kind === 'retrying' && retries[0].inMs).toBeLessThan(500);
    const second = await wsServer(port);
    cleanups.push(() => killServer(second.server));
    connected = nextConnection(second.server);
    peer = await connected;
    await sendAll(peer, sampleTexts(70, 'calf', 10));
    await until(() => samples(client.frames()) === 120, 5000, 'all 120');
    const frames = client.frames();
    const lost = frames.filter((f) => f.kind === 'disconnection');
    expect(lost).toHaveLength(1);
    expect(lost[0]).toMatchObject({ kind: 'disconnection', muscles: null, detail: expect.stringMatching(/^code 1006/) });
    expect(lost[0]?.tS).toBeCloseTo(0.49, 9);
    // The pipeline makes the gap; the adapter says only what happened.
    expect(frames.filter((f) => f.kind === 'gap')).toEqual([]);
    // The record comes between the last sample before and the first after.
    const at = frames.indexOf(lost[0] as Frame);
    expect(frames.slice(0, at).filter((f) => f.kind === 'sample')).toHaveLength(50);
    expect(client.links.filter((e) => e.kind === 'connected')).toHaveLength(2);
  });

  it('finds a dead peer by ping/pong, drops it and reconnects', async () => {
    const peer = await silentPeer();
    cleanups.push(peer.close);
    const client = subscribeClient(`ws://127.0.0.1:${peer.port}`, { pingMs: 100 });
    await until(() => client.links.some((e) => e.kind === 'disconnected'), 3000, 'the dead peer to be found');
    const lost = client.links.find((e) => e.kind === 'disconnected');
    expect(lost?.kind === 'disconnected' && lost.detail).toContain('no answer to ping');
    await until(() => client.links.filter((e) => e.kind === 'connected').length >= 2, 3000, 'a new connection');
  });

  it('closes its socket and clears its timers on unsubscribe, and never connects again', async () => {
    const { server: s, url } = await server();
    const connected = nextConnection(s);
    const client = subscribeClient(url, { pingMs: 50 });
    const peer = await connected;
    await until(() => client.links.some((e) => e.kind === 'connected'), 3000, 'the client to be open');
    const closed = new Promise<number>((resolve) => peer.once('close', (code) => resolve(code)));
    client.sub.unsubscribe();
    expect(await closed).toBe(1000);
    const linksAtStop = client.links.length;
    await new Promise((r) => setTimeout(r, 300));
    expect(s.clients.size).toBe(0);
    expect(client.links.length).toBe(linksAtStop);
  });

  it('stops retrying when unsubscribed while nothing listens', async () => {
    const { server: s, url } = await server();
    await killServer(s);
    const client = subscribeClient(url, { firstMs: 20, maxMs: 40 });
    await until(() => client.links.filter((e) => e.kind === 'retrying').length >= 2, 3000, 'two retries');
    client.sub.unsubscribe();
    const n = client.links.length;
    await new Promise((r) => setTimeout(r, 200));
    expect(client.links.length).toBe(n);
    expect(client.errors).toEqual([]);
  });

  it('counts a message over the cap as line_too_long, then reconnects', async () => {
    const { server: s, url } = await server();
    let connected = nextConnection(s);
    const client = subscribeClient(url, { maxMessageBytes: 4096 });
    const peer = await connected;
    connected = nextConnection(s);
    const closed = new Promise<number>((resolve) => peer.once('close', (code) => resolve(code)));
    peer.send(JSON.stringify({ t: 1, marker: 'x'.repeat(10_000) }));
    expect(await closed).toBe(1009);
    const again = await connected;
    await sendAll(again, sampleTexts(3));
    await until(() => samples(client.frames()) === 3, 4000, 'the samples after');
    const rejections = client.frames().filter((f) => f.kind === 'rejection');
    expect(rejections.map((r) => r.kind === 'rejection' && r.reason)).toEqual(['line_too_long']);
  });
});


describe('websocketClient against a peer that never answers the closing handshake', () => {
  it('cuts the connection a second after unsubscribing', async () => {
    const peer = await silentPeer();
    cleanups.push(peer.close);
    const client = subscribeClient(`ws://127.0.0.1:${peer.port}`, { pingMs: 60_000 });
    await until(() => client.links.some((e) => e.kind === 'connected'), 3000, 'the connection');
    client.sub.unsubscribe();
    await until(() => peer.sockets.size === 0, 3000, 'the socket to be cut');
  });
});

describe('websocketClient on virtual time', () => {
  it('waits for the scheduler before each retry, so backoff is tested without waiting', async () => {
    const { VirtualTimeScheduler, VirtualAction } = await import('rxjs');
    const { server: s, url } = await wsServer();
    await killServer(s);
    const scheduler = new VirtualTimeScheduler(VirtualAction, 10_000);
    const client = subscribeClient(url, { scheduler });
    await until(() => client.links.some((e) => e.kind === 'retrying'), 3000, 'the first refusal');
    await new Promise((r) => setTimeout(r, 200));
    // Real time passes, virtual time does not: no second attempt yet.
    expect(client.links.filter((e) => e.kind === 'connecting')).toHaveLength(1);
    const first = client.links.find((e) => e.kind === 'retrying');
    scheduler.flush();
    expect(client.links.filter((e) => e.kind === 'connecting')).toHaveLength(2);
    expect(scheduler.now()).toBe(first?.kind === 'retrying' ? first.inMs : -1);
  });
});
