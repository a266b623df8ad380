import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { appendFile, mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { VirtualAction, VirtualTimeScheduler } from 'rxjs';
import { run } from '../../src/commands/live.ts';
import type { CommandIo } from '../../src/run/io.ts';
import { startSimulator, type RunningSimulator } from '../../src/sim/simulator.ts';
import { fileSource } from '../../adapters/file-source.ts';
import { runTrial } from '../../src/run/run-trial.ts';
import { summaryJson } from '../../src/output/summary-json.ts';
import { sampleTexts, sendAll, until, wsClient } from '../adapters/ws-peers.ts';
import { endedAfterEach, expectReplayOfLog, lengthwise as start, listeningPort, readJson as json, replaySummary, withoutSourceOrProvenance, type Child } from '../helpers/command-child.ts';

const { children, stops } = endedAfterEach();

/** Starts the command, killed after the test if it still runs. */
function lengthwise(args: readonly string[]): Child {
  const c = start(args);
  children.push(c);
  return c;
}

async function tmp(): Promise<string> {
  return mkdtemp(join(tmpdir(), 'lengthwise-live-'));
}

/** Waits until the session log on disk holds this many sample lines and rejected lines (it is flushed every second). */
async function logHolds(path: string, samples: number, rejected = 0): Promise<void> {
  const counts = (): { samples: number; rejected: number } => {
    const lines = existsSync(path) ? readFileSync(path, 'utf8').split('\n') : [];
    return {
      samples: lines.filter((l) => l.startsWith('{"t"') && l.includes('"fascicle_mm"')).length,
      rejected: lines.filter((l) => l.startsWith('{"rejected"')).length,
    };
  };
  await until(() => counts().samples >= samples && counts().rejected >= rejected, 15_000, `the log to hold ${samples} samples and ${rejected} rejected lines`);
}

const BAD_MESSAGES: readonly (readonly [string, string])[] = [
  ['{"t": 1, "muscle": "calf"', 'not_json'],
  ['{"t": 1, "muscle": "calf", "fascicle_mm": 0}', 'out_of_range'],
  ['{"t": 1, "event": "hop", "side": "left"}', 'unknown_event'],
  ['{"__proto__": {"t": 1}}', 'unsafe_key'],
  [`{"x": ${'['.repeat(30)}${']'.repeat(30)}}`, 'too_deep'],
  ['{"what": 1}', 'schema'],
];

describe('lengthwise live: options', () => {
  it('prints its help with exit 0', async () => {
    const c = lengthwise(['live', '--help']);
    expect((await c.exited).code).toBe(0);
    expect(c.stdout).toContain('--connect URL');
    expect(c.stdout).toContain('--listen [HOST:]PORT');
  });

  it.each([
    [[], /exactly one/],
    [['--connect', 'ws://127.0.0.1:1', '--listen', '8765'], /exactly one/],
    [['--connect', 'http://127.0.0.1:1'], /give a ws:\/\/ or wss:\/\/ URL/],
    [['--listen', 'port'], /give PORT/],
    [['--listen', '8765', '--duration=-1'], /give seconds above 0/],
    [['--listen', '8765', '--mapping', '/nonexistent/m.json'], /cannot read mapping file/],
  ])('refuses %j with exit 2 and says what is accepted', async (args, message) => {
    const c = lengthwise(['live', ...args]);
    expect((await c.exited).code).toBe(2);
    expect(c.stderr).toMatch(message);
  });
});

describe('lengthwise live --listen: secure by default', () => {
  it.each([['0.0.0.0:0'], ['[::]:0'], ['lab-pc.invalid:0']])('refuses to listen on %s, where other machines reach, without a token', async (address) => {
    const dir = await tmp();
    const c = lengthwise(['live', '--listen', address, '--plain', '--log', join(dir, 'l.ndjson')]);
    expect((await c.exited).code).toBe(2);
    expect(c.stderr).toContain('lets other machines connect, and no --token is given');
    expect(c.stderr).toContain('--no-token');
    expect(c.stderr).not.toContain('listening on');
    expect(existsSync(join(dir, 'l.ndjson'))).toBe(false);
  });

  it('listens on every interface with --no-token, warning at the start and at the end', async () => {
    const dir = await tmp();
    const c = lengthwise(['live', '--listen', '0.0.0.0:0', '--no-token', '--plain', '--log', join(dir, 'l.ndjson'), '--summary', join(dir, 's.json'), '--duration', '2.5']);
    await until(() => /listening on ws:\/\/0\.0\.0\.0:\d+/.test(c.stderr), 15_000, `the child to listen (stderr: ${c.stderr})`);
    const port = Number(/listening on ws:\/\/0\.0\.0\.0:(\d+)/.exec(c.stderr)?.[1]);
    const ws = await wsClient(`ws://127.0.0.1:${port}`);
    stops.push(() => ws.terminate());
    await sendAll(ws, sampleTexts(5));
    expect((await c.exited).code).toBe(0);
    expect((await json(join(dir, 's.json'))).frames).toMatchObject({ accepted: 5 });
    const warnings = c.stderr.split('\n').filter((l) => l.includes('WARNING: listening on 0.0.0.0:0 with NO TOKEN'));
    expect(warnings).toHaveLength(2);
    expect(c.stderr.indexOf('WARNING')).toBeLessThan(c.stderr.indexOf('listening on ws://'));
  });

  it.each([
    [['--listen', '127.0.0.1:0', '--token', 't', '--no-token'], /--token T or --no-token, not both/],
    [['--connect', 'ws://127.0.0.1:9', '--no-token'], /--no-token is for --listen/],
  ])('refuses %j', async (args, message) => {
    const c = lengthwise(['live', ...args]);
    expect((await c.exited).code).toBe(2);
    expect(c.stderr).toMatch(message);
  });
});

describe('lengthwise live --listen', () => {
  it('survives a killed process: the log of what was received replays with the same counts', async () => {
    const dir = await tmp();
    const log = join(dir, 'session.ndjson');
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--log', log, '--plain']);
    const port = await listeningPort(c);
    const ws = await wsClient(`ws://127.0.0.1:${port}`);
    stops.push(() => ws.terminate());
    const texts = sampleTexts(300, 'calf');
    const messages: string[] = [];
    for (let i = 0; i < 300; i += 30) messages.push(`[${texts.slice(i, i + 30).join(',')}]`);
    await sendAll(ws, [...messages, ...BAD_MESSAGES.map(([m]) => m)]);
    // The log is flushed at least every second: what is on disk is all there is after a kill.
    await logHolds(log, 300, BAD_MESSAGES.length);
    c.child.kill('SIGKILL');
    expect((await c.exited).signal).toBe('SIGKILL');
    const summary = await replaySummary(log, dir);
    expect(summary.frames).toMatchObject({ accepted: 300, rejected: BAD_MESSAGES.length });
    expect(summary.frames['rejected_by_reason']).toEqual({ not_json: 1, out_of_range: 1, unknown_event: 1, unsafe_key: 1, too_deep: 1, schema: 1 });

    // A line torn by a kill in the middle of a write is at worst one rejected line.
    await appendFile(log, '{"t":3.01,"muscle":"calf","fascicle_mm":5');
    const torn = await replaySummary(log, dir, 'torn.json');
    expect(torn.frames).toMatchObject({ accepted: 300, rejected: BAD_MESSAGES.length + 1 });
    expect((torn.frames['rejected_by_reason'] as Record<string, number>)['not_json']).toBe(2);
  });

  it('ends on SIGTERM: writes the summary, closes the log and exits 0; the replay of its log gives the same summary', async () => {
    const dir = await tmp();
    const log = join(dir, 'session.ndjson');
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--log', log, '--plain', '--summary', join(dir, 'live.json'), '--report', join(dir, 'live.html')]);
    const port = await listeningPort(c);
    const header = JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'left' } } });
    const a = await wsClient(`ws://127.0.0.1:${port}`);
    const b = await wsClient(`ws://127.0.0.1:${port}`);
    stops.push(() => a.terminate(), () => b.terminate());
    const strikes = [0.2, 1.2, 2.2].map((t) => JSON.stringify({ t, event: 'foot_strike', side: 'left' }));
    await sendAll(a, [header, ...sampleTexts(150, 'calf'), ...strikes.slice(0, 2)]);
    await sendAll(b, sampleTexts(80, 'shin'));
    a.close();
    await until(() => /DISCONNECTED/.test(c.stderr), 5000, 'the disconnection');
    await sendAll(b, [...sampleTexts(20, 'shin', 1), ...BAD_MESSAGES.map(([m]) => m)]);
    await logHolds(log, 250, BAD_MESSAGES.length);
    c.child.kill('SIGTERM');
    expect((await c.exited).code).toBe(0);
    expect(c.stderr).toContain(`session log: ${log}`);
    const live = await json(join(dir, 'live.json'));
    expect(live.frames).toMatchObject({ accepted: 250, rejected: BAD_MESSAGES.length, headers: 1, gait_events: 2, markers: 1 });
    await expectReplayOfLog(log, dir, live);
    expect(await readFile(join(dir, 'live.html'), 'utf8')).toContain('<svg');
  });

  it('says loudly when the log cannot be written, goes on, and the summary and the exit status say the log is incomplete', async () => {
    const dir = await tmp();
    await writeFile(join(dir, 'a-file'), '');
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--log', join(dir, 'a-file', 'log.ndjson'), '--plain', '--summary', join(dir, 's.json'), '--duration', '2.5']);
    const port = await listeningPort(c);
    const ws = await wsClient(`ws://127.0.0.1:${port}`);
    stops.push(() => ws.terminate());
    await sendAll(ws, sampleTexts(10));
    expect((await c.exited).code).toBe(1);
    expect(c.stderr).toMatch(/session log .* could not be opened \(ENOTDIR/);
    const summary = await json(join(dir, 's.json'));
    expect(summary.frames).toMatchObject({ accepted: 10 });
    expect((summary['warnings'] as string[]).some((w) => /session log is incomplete/.test(w))).toBe(true);
  });

  it('keeps a muscle\'s side and strides when a second device declares it otherwise, says so, and the log replays the same', async () => {
    const dir = await tmp();
    const log = join(dir, 'session.ndjson');
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--log', log, '--plain', '--summary', join(dir, 'live.json')]);
    const port = await listeningPort(c);
    const a = await wsClient(`ws://127.0.0.1:${port}`);
    const b = await wsClient(`ws://127.0.0.1:${port}`);
    stops.push(() => a.terminate(), () => b.terminate());
    const header = (side: string): string => JSON.stringify({ format: 'lengthwise-stream', version: 1, muscles: { calf: { side } } });
    const left = [0.2, 1.2, 2.2].map((t) => JSON.stringify({ t, event: 'foot_strike', side: 'left' }));
    const right = [0.5, 0.9, 1.3, 1.7].map((t) => JSON.stringify({ t, event: 'foot_strike', side: 'right' }));
    await sendAll(a, [header('left'), ...sampleTexts(100, 'calf'), left[0] as string]);
    await logHolds(log, 100);
    // The second device tries to make calf a right muscle, cut by its own foot strikes.
    await sendAll(b, [header('right'), ...right]);
    await until(() => c.stderr.includes('refused the header of device 2'), 15_000, 'the refusal');
    await sendAll(a, [...sampleTexts(150, 'calf', 1), ...left.slice(1)]);
    await logHolds(log, 250);
    c.child.kill('SIGTERM');
    expect((await c.exited).code).toBe(0);
    expect(c.stderr).toMatch(/refused the header of device 2 \(127\.0\.0\.1:\d+\) for muscle "calf" as right: device 1 carries it \(left\)/);
    expect(c.stderr).toMatch(/^note: refused the header of device 2/m);
    const live = await json(join(dir, 'live.json'));
    const calf = (live['muscles'] as Record<string, { side: string; strides: { start_s: number }[] }>)['calf'];
    expect(calf?.side).toBe('left');
    expect(calf?.strides.map((s) => s.start_s)).toEqual([0.2, 1.2]);
    await expectReplayOfLog(log, dir, live);
  });

  it('refuses a device without the token with 401 and takes one with it', async () => {
    const dir = await tmp();
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--token', 'bench-7', '--log', join(dir, 'l.ndjson'), '--plain', '--summary', join(dir, 's.json'), '--duration', '3']);
    const port = await listeningPort(c);
    await expect(wsClient(`ws://127.0.0.1:${port}`)).rejects.toThrow(/401/);
    const ws = await wsClient(`ws://127.0.0.1:${port}/?token=bench-7`);
    stops.push(() => ws.terminate());
    await sendAll(ws, sampleTexts(5));
    expect((await c.exited).code).toBe(0);
    expect((await json(join(dir, 's.json'))).frames).toMatchObject({ accepted: 5 });
    expect(c.stderr).toMatch(/refused a connection/);
  });

  it('reads a device through a mapping, and the log holds our own records', async () => {
    const dir = await tmp();
    const log = join(dir, 'l.ndjson');
    const mapping = join(import.meta.dirname, '..', '..', 'adapters', 'mappings', 'twin-probe-si.json');
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--mapping', mapping, '--log', log, '--plain', '--summary', join(dir, 's.json'), '--duration', '2.5']);
    const port = await listeningPort(c);
    const ws = await wsClient(`ws://127.0.0.1:${port}`);
    stops.push(() => ws.terminate());
    await sendAll(ws, [JSON.stringify([{ ts_us: 10_000, site: 'calf', len_m: 0.0523 }, { ts_us: 20_000, site: 'calf', len_m: 0.0525 }])]);
    expect((await c.exited).code).toBe(0);
    const first = JSON.parse((await readFile(log, 'utf8')).split('\n')[0] as string);
    expect(first).toMatchObject({ t: 0.01, muscle: 'calf' });
    expect(first.fascicle_mm).toBeCloseTo(52.3, 9);
  });

  it('hints at a mapping when fascicle lengths look like metres', async () => {
    const dir = await tmp();
    const c = lengthwise(['live', '--listen', '127.0.0.1:0', '--log', join(dir, 'l.ndjson'), '--plain', '--duration', '2.5']);
    const port = await listeningPort(c);
    const ws = await wsClient(`ws://127.0.0.1:${port}`);
    stops.push(() => ws.terminate());
    await sendAll(ws, ['{"t": 0, "muscle": "calf", "fascicle_mm": 0.05}']);
    expect((await c.exited).code).toBe(0);
    expect(c.stderr).toMatch(/0\.05 mm looks like metres.*--mapping FILE/);
    // With no --summary, the summary goes beside the log.
    expect((await json(join(dir, 'l.summary.json'))).frames).toMatchObject({ accepted: 1 });
  });
});

describe('lengthwise live --connect', () => {
  async function simulator(extra: Parameters<typeof startSimulator>[0] = {}): Promise<RunningSimulator> {
    // A command slow to start on a busy machine still gets the whole stream: the device waits for it.
    const sim = await startSimulator({ port: 0, seed: 3, firstConnectionWithinS: 25, ...extra });
    stops.push(() => sim.stop());
    return sim;
  }

  /** A session connected to the simulator: its clock starts at the connection, and the session ends (SIGTERM) once the device has ended. */
  async function session(sim: RunningSimulator) {
    const dir = await tmp();
    const log = join(dir, 'session.ndjson');
    const c = lengthwise(['live', '--connect', sim.url, '--log', log, '--plain', '--summary', join(dir, 'live.json')]);
    await sim.done;
    expect(sim.stats.connections, 'the command to have connected').toBeGreaterThanOrEqual(1);
    c.child.kill('SIGTERM');
    expect((await c.exited).code, c.stderr).toBe(0);
    return { dir, log, live: await json(join(dir, 'live.json')) };
  }

  it('accepts exactly the valid samples the simulator sent, and the replay of its log gives the same summary', async () => {
    // The device ends its stream (closing cleanly) before the session ends, so everything it sent was received.
    const sim = await simulator({ durationS: 2 });
    const { dir, log, live } = await session(sim);
    expect(live.frames['accepted']).toBe(sim.stats.samplesSent);
    expect(live.frames['headers']).toBe(sim.stats.headersSent);
    expect(live.ended).toBe(true);
    await expectReplayOfLog(log, dir, live);
  });

  it('through faults (malformed messages, disconnections, restarts) loses no valid sample received, and the log with its gaps restored replays the same', async () => {
    // Faults at 0.6, 1.2, … s from the session's connection; the device ends its stream at 3.6 s and the
    // session after that, so what it sent was received.
    const sim = await simulator({ durationS: 3.6, faults: { everyS: 0.6, kinds: ['malformed', 'disconnect', 'resent_header', 'malformed', 'device_restart'] } });
    const { log, live } = await session(sim);
    expect(sim.stats.faults['disconnect'] ?? 0).toBeGreaterThanOrEqual(1);
    expect(sim.stats.faults['device_restart'] ?? 0).toBe(1);
    // Every valid sample sent was accepted, through the drop-outs; every malformed one rejected for its reason.
    expect(live.frames['accepted']).toBe(sim.stats.samplesSent);
    const badSent = Object.fromEntries(Object.entries(sim.stats.badSent).filter(([, n]) => (n ?? 0) > 0));
    expect(live.frames['rejected_by_reason']).toEqual(badSent);
    expect(live.frames['markers']).toBeGreaterThanOrEqual(1);
    // Each lost connection is a line of its own in the log, and the replay restores its gaps from it.
    const lost = (await readFile(log, 'utf8')).split('\n').filter((l) => l.includes('"disconnected":'));
    expect(lost.length).toBe(Number(live.frames['markers']) - sim.stats.markersSent);
    expect(lost.length).toBeGreaterThanOrEqual(1);
    for (const l of lost) expect(JSON.parse(l)).toMatchObject({ disconnected: { muscles: null, detail: expect.any(String) } });
    const final = await runTrial(fileSource(log), { source: log }).done;
    expect(withoutSourceOrProvenance(JSON.parse(JSON.stringify(summaryJson(final))))).toEqual(withoutSourceOrProvenance(live));
  });
});

const HAS_TMUX = spawnSync('tmux', ['-V'], { encoding: 'utf8' }).status === 0;
const REPO = join(import.meta.dirname, '..', '..');

describe.skipIf(!HAS_TMUX)(`lengthwise live on a real terminal${HAS_TMUX ? '' : ' (skipped: tmux is not installed)'}`, () => {
  const socket = `lengthwise-live-test-${process.pid}`;
  const tmux = (...args: string[]): string => execFileSync('tmux', ['-L', socket, ...args], { encoding: 'utf8' });
  afterEach(() => {
    spawnSync('tmux', ['-L', socket, 'kill-server']);
  });

  it('says "connecting to" before the screen is up, then a refusal with its reason in full on the screen', { timeout: 40_000 }, async () => {
    const refusing = lengthwise(['live', '--listen', '127.0.0.1:0', '--token', 'lab-7', '--plain', '--log', join(await tmp(), 'server.ndjson')]);
    const port = await listeningPort(refusing);
    const dir = await tmp();
    const script = `cd '${REPO}' && unset CI; export NO_COLOR=1; node bin/lengthwise.js live --connect 'ws://127.0.0.1:${port}/?token=wrong' --log '${join(dir, 'l.ndjson')}'; sleep 30`;
    // A tmux server of its own: the other test's server may still be going away.
    const own = `${socket}-refused`;
    stops.push(() => spawnSync('tmux', ['-L', own, 'kill-server']));
    const tmux = (...args: string[]): string => execFileSync('tmux', ['-L', own, ...args], { encoding: 'utf8' });
    tmux('new-session', '-d', '-s', 'refused', '-x', '80', '-y', '24', script);
    const screen = (): string => tmux('capture-pane', '-p', '-J', '-S', '-100', '-t', 'refused');
    // The first thing on the terminal, before the screen's thread has drawn anything.
    await until(() => screen().trim() !== '', 20_000, 'anything on the terminal');
    expect(screen().trim().split('\n')[0]).toBe(`lengthwise live: connecting to ws://127.0.0.1:${port}/?token=***`);
    const flat = (): string => screen().replace(/\s+/g, ' ');
    await until(
      () => flat().includes('NOT CONNECTED, trying again in') && flat().includes('HTTP 401 Unauthorized: Unauthorized: send "Authorization: Bearer TOKEN" or ?token=TOKEN'),
      20_000,
      `the refusal in full on the screen (screen: ${screen()})`,
    );
    expect(screen()).not.toContain('DISCONNECTED');
    tmux('send-keys', '-t', 'refused', 'q');
  });

  it('shows the connection and the log path, and q ends the session with the summary written', { timeout: 40_000 }, async () => {
    const sim = await startSimulator({ port: 0, seed: 5 });
    stops.push(() => sim.stop());
    const dir = await tmp();
    const log = join(dir, 'session.ndjson');
    const summary = join(dir, 'live.json');
    const status = join(dir, 'status');
    const script = `cd '${REPO}' && unset CI; export NO_COLOR=1; node bin/lengthwise.js live --connect '${sim.url}' --log '${log}' --summary '${summary}'; echo $? > '${status}'; sleep 30`;
    tmux('new-session', '-d', '-s', 'live', '-x', '100', '-y', '30', script);
    const screen = (): string => tmux('capture-pane', '-p', '-t', 'live');
    await until(() => screen().includes('connected') && screen().includes('session.ndjson') && /\d+ samples/.test(screen()), 20_000, 'the dashboard with the connection and the log');
    tmux('send-keys', '-t', 'live', 'q');
    await until(() => existsSync(status) && readFileSync(status, 'utf8').trim() !== '', 15_000, 'the exit status');
    expect(readFileSync(status, 'utf8').trim()).toBe('0');
    const live = await json(summary);
    expect(live.frames['accepted']).toBeGreaterThan(0);
    expect(live.ended).toBe(true);
    await expectReplayOfLog(log, dir, live);
  });
});

describe('lengthwise live in-process, on virtual time', () => {
  it('ends after --duration of the given clock and writes the summary', async () => {
    const dir = await tmp();
    const scheduler = new VirtualTimeScheduler(VirtualAction, 60_000);
    const out: string[] = [];
    const err: string[] = [];
    const io: CommandIo = {
      out: (t) => out.push(t),
      err: (t) => err.push(t),
      stdout: process.stdout,
      stderr: process.stderr,
      stdin: process.stdin,
      env: { NO_COLOR: '1' },
    };
    const ran = run(['--listen', '127.0.0.1:0', '--plain', '--duration', '30', '--log', join(dir, 'l.ndjson'), '--summary', join(dir, 's.json')], io, { scheduler });
    await until(() => err.some((l) => l.startsWith('listening on')), 5000, 'listening');
    const port = Number(/:(\d+)$/.exec(err.find((l) => l.startsWith('listening on')) ?? '')?.[1]);
    const ws = await wsClient(`ws://127.0.0.1:${port}`);
    stops.push(() => ws.terminate());
    await sendAll(ws, sampleTexts(25));
    await logHolds(join(dir, 'l.ndjson'), 25);
    // Thirty virtual seconds pass at once: status lines every 3 s, then the end.
    scheduler.flush();
    expect(await ran).toBe(0);
    // A status line every 3 virtual seconds while the session ran; none once it has ended.
    const statusLines = (): number => err.filter((l) => l.startsWith(`ws://127.0.0.1:${port} | `)).length;
    expect(statusLines()).toBeGreaterThanOrEqual(9);
    const n = statusLines();
    scheduler.flush();
    expect(statusLines()).toBe(n);
    expect((await json(join(dir, 's.json'))).frames).toMatchObject({ accepted: 25 });
    expect(out.join('\n')).toContain('25 samples accepted');
  });
});

describe('lengthwise live --connect with a token in the URL', () => {
  it('never shows the token: status lines, messages, summary source, report and log hide it', { timeout: 30_000 }, async () => {
    const sim = await startSimulator({ port: 0, seed: 2, durationS: 1.5, firstConnectionWithinS: 25 });
    stops.push(() => sim.stop());
    const dir = await tmp();
    const scheduler = new VirtualTimeScheduler(VirtualAction, 60_000);
    const out: string[] = [];
    const err: string[] = [];
    const io: CommandIo = { out: (t) => out.push(t), err: (t) => err.push(t), stdout: process.stdout, stderr: process.stderr, stdin: process.stdin, env: { NO_COLOR: '1' } };
    const url = `${sim.url}/?token=sekrit-42`;
    const files = { log: join(dir, 'l.ndjson'), summary: join(dir, 's.json'), report: join(dir, 'r.html') };
    const ran = run(['--connect', url, '--plain', '--duration', '30', '--log', files.log, '--summary', files.summary, '--report', files.report], io, { scheduler });
    await sim.done;
    await until(() => err.some((l) => l.startsWith('DISCONNECTED')), 15_000, 'the end of the stream');
    // Thirty virtual seconds at once: status lines every 3 s, then the end.
    scheduler.flush();
    expect(await ran).toBe(0);
    const shown = `${sim.url}/?token=***`;
    const said = [...out, ...err].join('\n');
    expect(said).toContain(`connecting to ${shown}`);
    expect(err.some((l) => l.startsWith(`${shown} | `))).toBe(true);
    expect((await json(files.summary))['source']).toBe(shown);
    for (const text of [said, await readFile(files.summary, 'utf8'), await readFile(files.report, 'utf8'), await readFile(files.log, 'utf8')]) {
      expect(text).not.toContain('sekrit-42');
    }
    expect(await readFile(files.report, 'utf8')).toContain('token=***');
  });

  it('says at once that it is connecting, and a refused connection with the server\'s reason in full', async () => {
    const refusing = lengthwise(['live', '--listen', '127.0.0.1:0', '--token', 'lab-7', '--plain', '--log', join(await tmp(), 'server.ndjson')]);
    const port = await listeningPort(refusing);
    const dir = await tmp();
    const c = lengthwise(['live', '--connect', `ws://127.0.0.1:${port}/?token=wrong-one`, '--plain', '--log', join(dir, 'l.ndjson')]);
    await until(() => c.stderr.includes('not connected:'), 15_000, `the refusal (stderr: ${c.stderr})`);
    c.child.kill('SIGTERM');
    expect((await c.exited).code).toBe(0);
    const lines = c.stderr.split('\n');
    expect(lines[0]).toBe(`connecting to ws://127.0.0.1:${port}/?token=***`);
    expect(lines[1]).toMatch(
      /^not connected: the server refused the connection: HTTP 401 Unauthorized: Unauthorized: send "Authorization: Bearer TOKEN" or \?token=TOKEN; trying again in \d\.\d s$/,
    );
    expect(c.stderr).not.toContain('DISCONNECTED');
    expect(c.stderr).not.toContain('wrong-one');
  });

  it('does not repeat the token of a URL it refuses', async () => {
    const c = lengthwise(['live', '--connect', 'http://127.0.0.1:9/?token=sekrit-42']);
    expect((await c.exited).code).toBe(2);
    expect(c.stderr).toContain('"http://127.0.0.1:9/?token=***" is a http: URL');
    expect(c.stderr).not.toContain('sekrit-42');
  });
});
