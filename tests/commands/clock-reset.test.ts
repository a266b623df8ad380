import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { killServer, nextConnection, sendAll, until, wsClient, wsServer } from '../adapters/ws-peers.ts';
import { killChild, lengthwise, listeningPort, readJson, replaySummary, withoutSource, type Child } from '../helpers/command-child.ts';

const children: Child[] = [];
const stops: (() => unknown)[] = [];
afterEach(async () => {
  for (const c of children.splice(0)) killChild(c);
  while (stops.length > 0) await stops.pop()?.();
});

const HEADER = JSON.stringify({ format: 'lengthwise-stream', version: 1, subject: 'SYN-31', muscles: { calf: { side: 'left' } } });

/** An invented walk from the device's clock zero: 100 Hz samples of a 1.1 s cycle and a left foot strike each cycle, in messages of 0.5 s. */
function walkMessages(durationS: number): string[] {
  const records: string[] = [];
  for (let i = 0; i < durationS * 100; i++) {
    const t = i / 100;
    if (i % 110 === 5) records.push(JSON.stringify({ t, event: 'foot_strike', side: 'left' }));
    records.push(JSON.stringify({ t, muscle: 'calf', fascicle_mm: Math.round((55 - 6 * Math.cos((2 * Math.PI * t) / 1.1)) * 100) / 100 }));
  }
  const messages: string[] = [];
  for (let i = 0; i < records.length; i += 50) messages.push(`[${records.slice(i, i + 50).join(',')}]`);
  return messages;
}

async function expectContinued(live: Awaited<ReturnType<typeof readJson>>, log: string, dir: string, samples: number): Promise<void> {
  expect(live.frames).toMatchObject({ accepted: samples, rejected: 0 });
  const said = (live['warnings'] as string[]).filter((w) => /clock restarted/.test(w));
  expect(said).toHaveLength(1);
  const resets = (await readFile(log, 'utf8')).split('\n').filter((l) => l.includes('"clock_reset"'));
  expect(resets).toHaveLength(1);
  // The restarted clock (from 0) continues after the last time seen before it (5.99 s), however little wall time passed.
  expect(JSON.parse(resets[0] as string).clock_reset.offset_s).toBeGreaterThan(5.99);
  expect(withoutSource(await replaySummary(log, dir))).toEqual(withoutSource(live));
}

describe('a live device whose clock restarts', () => {
  it('(pushing to live --listen) goes on the session timeline with an offset: no sample is lost, it is said once, and the log replays the same', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-clock-'));
    const log = join(dir, 'session.ndjson');
    const summary = join(dir, 'live.json');
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--plain', '--log', log, '--summary', summary]);
    children.push(c);
    const url = `ws://127.0.0.1:${await listeningPort(c)}`;
    for (let run = 0; run < 2; run++) {
      const ws = await wsClient(url);
      stops.push(() => ws.terminate());
      await sendAll(ws, [HEADER, ...walkMessages(6)]);
      ws.close();
      await until(() => (c.stderr.match(/DISCONNECTED/g) ?? []).length > run, 15_000, 'the device to leave');
    }
    expect(c.stderr).toMatch(/device clock restarted: the device of "calf" began a connection with a header and t=0 s, after t=5\.99 s/);
    c.child.kill('SIGTERM');
    expect((await c.exited).code, c.stderr).toBe(0);
    await expectContinued(await readJson(summary), log, dir, 1200);
  });

  it('(served to live --connect) goes on the session timeline the same way after the reconnection', async () => {
    const server = await wsServer();
    stops.push(() => killServer(server.server));
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-clock-connect-'));
    const log = join(dir, 'session.ndjson');
    const summary = join(dir, 'live.json');
    let connection = nextConnection(server.server);
    const c = lengthwise(['live', '--connect', server.url, '--plain', '--log', log, '--summary', summary]);
    children.push(c);
    for (let run = 0; run < 2; run++) {
      const peer = await connection;
      connection = nextConnection(server.server);
      await sendAll(peer, [HEADER, ...walkMessages(6)]);
      peer.close(1001, 'device restarting');
      await until(() => (c.stderr.match(/DISCONNECTED/g) ?? []).length > run, 15_000, 'the connection to end');
    }
    c.child.kill('SIGTERM');
    expect((await c.exited).code, c.stderr).toBe(0);
    await expectContinued(await readJson(summary), log, dir, 1200);
  });
});

describe('a file whose time goes back after a second header', () => {
  it('stays a rejection: a file is not a live connection', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-clock-file-'));
    const file = join(dir, 'two-takes.ndjson');
    const lines = (messages: string[]): string[] => messages.flatMap((m) => (JSON.parse(m) as unknown[]).map((r) => JSON.stringify(r)));
    await writeFile(file, [HEADER, ...lines(walkMessages(6)), HEADER, ...lines(walkMessages(3))].join('\n'));
    const replayed = await replaySummary(file, dir);
    expect(replayed.frames).toMatchObject({ accepted: 600, rejected: 300, rejected_by_reason: { time_not_increasing: 300 } });
  });
});
