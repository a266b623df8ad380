import { afterEach, describe, expect, it } from 'vitest';
import type { Subscription } from 'rxjs';
import type { LinkEvent } from '../../adapters/websocket-client.ts';
import { ListenError, websocketServer, type WebSocketServerOptions } from '../../adapters/websocket-server.ts';
import type { Batch, Frame } from '../../src/trial/records.ts';
import { flat, sampleTexts, sendAll, until, upgradeStatus, wsClient, wsServer, killServer } from './ws-peers.ts';

const cleanups: (() => unknown)[] = [];
afterEach(async () => {
  while (cleanups.length > 0) await cleanups.pop()?.();
});

async function listen(extra: Partial<WebSocketServerOptions> = {}) {
  const batches: Batch[] = [];
  const links: LinkEvent[] = [];
  const errors: unknown[] = [];
  const sub: Subscription = websocketServer({ port: 0, onLink: (e) => links.push(e), ...extra }).subscribe({
    next: (b) => batches.push(b),
    error: (e) => errors.push(e),
  });
  cleanups.push(() => sub.unsubscribe());
  await until(() => links.some((e) => e.kind === 'listening') || errors.length > 0, 3000, 'listening');
  const at = links.find((e) => e.kind === 'listening');
  const url = at?.kind === 'listening' ? at.url : '';
  return { batches, links, errors, sub, url, frames: (): Frame[] => flat(batches) };
}

function samples(frames: readonly Frame[], muscle?: string): number {
  return frames.filter((f) => f.kind === 'sample' && (muscle === undefined || f.muscle === muscle)).length;
}

async function device(url: string, headers: Record<string, string> = {}) {
  const ws = await wsClient(url, headers);
  cleanups.push(() => ws.terminate());
  return ws;
}

describe('websocketServer', () => {
  it('binds 127.0.0.1 by default and emits nothing before a device sends', async () => {
    const s = await listen();
    expect(s.url).toMatch(/^ws:\/\/127\.0\.0\.1:\d+$/);
    expect(s.batches).toEqual([]);
  });

  it('accepts every valid sample of a pushing device, one batch per message', async () => {
    const s = await listen();
    const ws = await device(s.url);
    const texts = sampleTexts(200);
    const messages: string[] = [];
    for (let i = 0; i < 200; i += 25) messages.push(`[${texts.slice(i, i + 25).join(',')}]`);
    await sendAll(ws, messages);
    await until(() => samples(s.frames()) === 200, 4000, '200 samples');
    expect(s.batches).toHaveLength(8);
  });

  it('takes two devices at once, each its own muscles, and gaps only the muscles of the one that leaves', async () => {
    const s = await listen();
    const a = await device(s.url);
    const b = await device(s.url);
    await Promise.all([sendAll(a, sampleTexts(30, 'calf')), sendAll(b, sampleTexts(40, 'thigh'))]);
    await until(() => samples(s.frames()) === 70, 4000, 'both devices');
    expect(samples(s.frames(), 'calf')).toBe(30);
    expect(samples(s.frames(), 'thigh')).toBe(40);
    a.terminate();
    await until(() => s.frames().some((f) => f.kind === 'disconnection'), 4000, 'the disconnection');
    const lost = s.frames().filter((f) => f.kind === 'disconnection');
    expect(lost).toEqual([{ kind: 'disconnection', tS: 0.29, muscles: ['calf'], detail: expect.stringMatching(/^device 1 /), line: 71 }]);
    await sendAll(b, sampleTexts(5, 'thigh', 1));
    await until(() => samples(s.frames(), 'thigh') === 45, 4000, 'the other device going on');
  });

  it('with a token, refuses an upgrade without it (401) and accepts the header or the query', async () => {
    const s = await listen({ token: 'lab-secret-1' });
    expect(await upgradeStatus(s.url)).toBe(401);
    expect(await upgradeStatus(s.url, { Authorization: 'Bearer wrong' })).toBe(401);
    expect(await upgradeStatus(`${s.url}/?token=wrong`)).toBe(401);
    expect(s.links.filter((e) => e.kind === 'refused')).toHaveLength(3);
    const byHeader = await device(s.url, { Authorization: 'Bearer lab-secret-1' });
    const byQuery = await device(`${s.url}/?token=lab-secret-1`);
    await sendAll(byHeader, sampleTexts(2, 'calf'));
    await sendAll(byQuery, sampleTexts(3, 'thigh'));
    await until(() => samples(s.frames()) === 5, 4000, 'both');
  });

  it('lets a device\'s header set sides only for its own muscles: another device\'s is refused and said', async () => {
    const s = await listen();
    const a = await device(s.url);
    await sendAll(a, [JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'left' } } }), ...sampleTexts(3, 'calf')]);
    await until(() => samples(s.frames()) === 3, 4000, 'the first device');
    const b = await device(s.url);
    await sendAll(b, [JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'right' }, thigh: { side: 'right' } } })]);
    await until(() => s.frames().filter((f) => f.kind === 'header').length === 2, 4000, 'the second header');
    const second = s.frames().filter((f) => f.kind === 'header')[1];
    expect(second?.kind === 'header' && second.muscles).toEqual({ thigh: { side: 'right' } });
    const conflicts = s.links.filter((e) => e.kind === 'conflict');
    expect(conflicts).toEqual([{ kind: 'conflict', peer: expect.stringMatching(/^127\.0\.0\.1:\d+$/), detail: expect.stringContaining('device 2') }]);
    expect(conflicts[0]?.kind === 'conflict' && conflicts[0].detail).toMatch(/for muscle "calf" as right: device 1 carries it \(left\)/);
    // Once the first device is gone, its muscles are free.
    a.terminate();
    await until(() => s.frames().some((f) => f.kind === 'disconnection'), 4000, 'the disconnection');
    await sendAll(b, [JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'right' } } })]);
    await until(() => s.frames().filter((f) => f.kind === 'header').length === 3, 4000, 'the third header');
    const third = s.frames().filter((f) => f.kind === 'header')[2];
    expect(third?.kind === 'header' && third.muscles).toEqual({ calf: { side: 'right' } });
    expect(s.links.filter((e) => e.kind === 'conflict')).toHaveLength(1);
  });

  it('takes the Bearer scheme in any letter case', async () => {
    // The authentication scheme is a case-insensitive token: RFC 9110 §11.1 (Fielding, Nottingham & Reschke 2022).
    const s = await listen({ token: 'lab-secret-1' });
    for (const scheme of ['bearer', 'BEARER', 'BeArEr']) {
      expect(await upgradeStatus(s.url, { Authorization: `${scheme} lab-secret-1` }), scheme).toBeNull();
    }
    expect(await upgradeStatus(s.url, { Authorization: 'bearer lab-secret-2' })).toBe(401);
    expect(await upgradeStatus(s.url, { Authorization: 'Bearerlab-secret-1' })).toBe(401);
    expect(await upgradeStatus(s.url, { Authorization: 'Basic lab-secret-1' })).toBe(401);
  });

  it('without a token, accepts any device', async () => {
    const s = await listen();
    expect(await upgradeStatus(s.url)).toBeNull();
  });

  it('refuses a payload over 256 KiB with close code 1009, counts it as line_too_long, and goes on', async () => {
    const s = await listen();
    const big = await device(s.url);
    const closed = new Promise<number>((resolve) => big.once('close', (code) => resolve(code)));
    big.send(JSON.stringify({ t: 0, marker: 'x'.repeat(256 * 1024) }));
    expect(await closed).toBe(1009);
    await until(() => s.frames().some((f) => f.kind === 'rejection'), 3000, 'the rejection');
    expect(s.frames().filter((f) => f.kind === 'rejection').map((f) => f.kind === 'rejection' && f.reason)).toEqual(['line_too_long']);
    // Just under the cap is fine.
    const ok = await device(s.url);
    const under = JSON.stringify({ t: 0, marker: 'y'.repeat(256 * 1024 - 100) });
    await sendAll(ok, [under]);
    await until(() => s.frames().some((f) => f.kind === 'marker' && f.marker.startsWith('y')), 3000, 'the marker');
  });

  it('errors with a ListenError that says what to do when the port is taken', async () => {
    const taken = await wsServer();
    cleanups.push(() => killServer(taken.server));
    const s = await listen({ port: taken.port });
    expect(s.errors).toHaveLength(1);
    expect(s.errors[0]).toBeInstanceOf(ListenError);
    expect((s.errors[0] as Error).message).toMatch(/EADDRINUSE.*give another port/);
  });

  it('closes every connection and the server on unsubscribe', async () => {
    const s = await listen();
    const ws = await device(s.url);
    const closed = new Promise<number>((resolve) => ws.once('close', (code) => resolve(code)));
    s.sub.unsubscribe();
    expect(await closed).toBe(1001);
    expect(await upgradeStatus(s.url)).toBe(-1);
    const n = s.batches.length;
    await new Promise((r) => setTimeout(r, 100));
    expect(s.batches.length).toBe(n);
  });
});
