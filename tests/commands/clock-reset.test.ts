import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { killServer, nextConnection, sendAll, until, wsClient, wsServer } from '../adapters/ws-peers.ts';
import { endedAfterEach, endSession, expectReplayOfLog, listeningPort, liveSession, readJson, replaySummary, type LiveSession } from '../helpers/command-child.ts';

const { children, stops } = endedAfterEach();

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

/** Ends the session after its two connections and checks its summary, its log and the log's replay. */
async function expectContinued({ child, log, dir, summary }: LiveSession, samples: number): Promise<void> {
  await endSession(child, 2);
  const live = await readJson(summary);
  expect(live.frames).toMatchObject({ accepted: samples, rejected: 0 });
  const said = (live['warnings'] as string[]).filter((w) => /clock restarted/.test(w));
  expect(said).toHaveLength(1);
  const resets = (await readFile(log, 'utf8')).split('\n').filter((l) => l.includes('"clock_reset"'));
  expect(resets).toHaveLength(1);
  // The restarted clock (from 0) continues after the last time seen before it (5.99 s), however little wall time passed.
  expect(JSON.parse(resets[0] as string).clock_reset.offset_s).toBeGreaterThan(5.99);
  await expectReplayOfLog(log, dir, live);
}

describe('a live device whose clock restarts', () => {
  it('(pushing to live --listen) goes on the session timeline with an offset: no sample is lost, it is said once, and the log replays the same', async () => {
    const s = await liveSession(['--listen', '127.0.0.1:0'], 'lengthwise-clock-');
    const c = s.child;
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
    await expectContinued(s, 1200);
  });

  it('(served to live --connect) goes on the session timeline the same way after the reconnection', async () => {
    const server = await wsServer();
    stops.push(() => killServer(server.server));
    let connection = nextConnection(server.server);
    const s = await liveSession(['--connect', server.url], 'lengthwise-clock-connect-');
    const c = s.child;
    children.push(c);
    for (let run = 0; run < 2; run++) {
      const peer = await connection;
      connection = nextConnection(server.server);
      await sendAll(peer, [HEADER, ...walkMessages(6)]);
      peer.close(1001, 'device restarting');
      await until(() => (c.stderr.match(/DISCONNECTED/g) ?? []).length > run, 15_000, 'the connection to end');
    }
    await expectContinued(s, 1200);
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
