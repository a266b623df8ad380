import { readFile, stat } from 'node:fs/promises';
import { describe, expect, it } from 'vitest';
import { killServer, nextConnection, sampleTexts, sendAll, wsClient, wsServer } from '../adapters/ws-peers.ts';
import { endedAfterEach, endSession, expectReplayOfLog, listeningPort, liveSession, readJson, type LiveSession } from '../helpers/command-child.ts';
import { MAX_MUSCLES_PER_TRIAL } from '../../src/trial/settings.ts';

const { children, stops } = endedAfterEach();

/** A session listening on 127.0.0.1, killed after the test if it still runs; the URL devices connect to. */
async function listeningSession(): Promise<LiveSession & { url: string }> {
  const s = await liveSession(['--listen', '127.0.0.1:0'], 'lengthwise-floods-');
  children.push(s.child);
  return { ...s, url: `ws://127.0.0.1:${await listeningPort(s.child)}` };
}

describe('a session log under floods that look legitimate', () => {
  it('grows with what was received: a 256 KiB array of bad elements and thousands of one-byte bad messages take a few lines, and replay to the live summary', async () => {
    const s = await listeningSession();
    const ws = await wsClient(s.url);
    stops.push(() => ws.terminate());
    const array = `[${Array.from({ length: 128 * 1024 - 1 }, () => '1').join(',')}]`;
    const tiny = Array.from({ length: 5000 }, (_, i) => (i % 2 === 0 ? 'x' : '{}'));
    const valid = sampleTexts(100);
    await sendAll(ws, [valid.slice(0, 50).join(''), array, ...tiny, `[${valid.slice(50).join(',')}]`]);
    ws.close();
    await endSession(s.child, 1);
    const received = Buffer.byteLength(array) + tiny.reduce((n, t) => n + t.length, 0) + valid.join(',').length;
    const logBytes = (await stat(s.log)).size;
    // Each valid sample is its own line, about as long as it came; the rejections are a few lines.
    expect(logBytes).toBeLessThan(received / 10);
    const live = await readJson(s.summary);
    expect(live.frames).toMatchObject({ accepted: 50, rejected: 1 + 128 * 1024 - 1 + 5000 });
    expect(live.frames.rejected_by_reason).toEqual({ not_json: 1 + 2500, schema: 128 * 1024 - 1 + 2500 });
    await expectReplayOfLog(s.log, s.dir, live);
  });

  it('records each message over the cap as one short rejection line, never padded, and a replay counts them', async () => {
    const s = await listeningSession();
    const big = `[${sampleTexts(5000).join(',')}]`;
    expect(Buffer.byteLength(big)).toBeGreaterThan(256 * 1024);
    for (let i = 0; i < 3; i++) {
      const ws = await wsClient(s.url);
      stops.push(() => ws.terminate());
      const closed = new Promise<number>((resolve) => ws.once('close', (code) => resolve(code)));
      await sendAll(ws, [big]).catch(() => undefined);
      expect(await closed).toBe(1009);
    }
    const ws = await wsClient(s.url);
    stops.push(() => ws.terminate());
    await sendAll(ws, sampleTexts(20));
    ws.close();
    await endSession(s.child, 4);
    const lines = (await readFile(s.log, 'utf8')).trimEnd().split('\n');
    for (const line of lines) expect(line.length).toBeLessThan(1024);
    const live = await readJson(s.summary);
    expect(live.frames).toMatchObject({ accepted: 20, rejected_by_reason: { line_too_long: 3 } });
    await expectReplayOfLog(s.log, s.dir, live);
  });

  it(`takes the first ${MAX_MUSCLES_PER_TRIAL} of 3000 one-sample muscles a device makes up, counts the rest as too_many_muscles, and the log replays the same`, async () => {
    const s = await listeningSession();
    const ws = await wsClient(s.url);
    stops.push(() => ws.terminate());
    const names = Array.from({ length: 3000 }, (_, i) => JSON.stringify({ t: i / 1000, muscle: `probe-${i}`, fascicle_mm: 50 }));
    for (let i = 0; i < names.length; i += 500) await sendAll(ws, [`[${names.slice(i, i + 500).join(',')}]`]);
    ws.close();
    await endSession(s.child, 1);
    const live = await readJson(s.summary);
    expect(Object.keys(live['muscles'] as object)).toHaveLength(MAX_MUSCLES_PER_TRIAL);
    expect(live.frames).toMatchObject({ accepted: MAX_MUSCLES_PER_TRIAL, rejected_by_reason: { too_many_muscles: 3000 - MAX_MUSCLES_PER_TRIAL } });
    // The lost connection names the device's muscles: no more than it may carry.
    const lost = (await readFile(s.log, 'utf8')).split('\n').find((l) => l.includes('"disconnected"')) ?? '';
    expect(JSON.parse(lost).disconnected.muscles).toHaveLength(MAX_MUSCLES_PER_TRIAL);
    expect((await stat(s.summary)).size).toBeLessThan(5 * 1024 * 1024);
    await expectReplayOfLog(s.log, s.dir, live);
  });

  it('gives the live summary on replay when a server sends a 400 KiB muscle name of bytes that are not UTF-8', async () => {
    const server = await wsServer();
    stops.push(() => killServer(server.server));
    const connected = nextConnection(server.server);
    const { child, dir, log, summary } = await liveSession(['--connect', server.url], 'lengthwise-utf8-');
    children.push(child);
    const peer = await connected;
    const name = Buffer.alloc(400 * 1024, 0xfe);
    const odd = Buffer.concat([Buffer.from('[{"t": 0.001, "muscle": "'), name, Buffer.from('", "fascicle_mm": 50}, {"t": 0.002, "muscle": "'), name, Buffer.from('", "fascicle_mm": 50}]')]);
    await new Promise<void>((resolve, reject) => peer.send(odd, { binary: false }, (e) => (e ? reject(e) : resolve())));
    await sendAll(peer, [`[${sampleTexts(200).join(',')}]`]);
    peer.close(1000, 'stream ended');
    await endSession(child, 1);
    const live = await readJson(summary);
    expect(live.frames).toMatchObject({ accepted: 200, rejected_by_reason: { line_too_long: 2 } });
    await expectReplayOfLog(log, dir, live);
  });
});
