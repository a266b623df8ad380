import { createServer } from 'node:net';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { WebSocket, WebSocketServer } from 'ws';
import type { CommandIo } from '../../src/run/io.ts';
import { parseSimulateArgs, run } from '../../src/commands/simulate.ts';
import { createCollector } from '../sim/ws-collector.ts';
import { killChild, lengthwise } from '../helpers/command-child.ts';
import { websocketServer } from '../../adapters/websocket-server.ts';
import type { Frame } from '../../src/trial/records.ts';

const REPO = join(import.meta.dirname, '..', '..');

interface TestIo {
  readonly io: CommandIo;
  readonly out: string[];
  readonly err: string[];
}

function testIo(): TestIo {
  const out: string[] = [];
  const err: string[] = [];
  const stream = new PassThrough() as unknown as NodeJS.WriteStream;
  return {
    out,
    err,
    io: {
      out: (t) => out.push(t),
      err: (t) => err.push(t),
      stdout: stream,
      stderr: stream,
      stdin: new PassThrough() as unknown as NodeJS.ReadStream,
      env: {},
    },
  };
}

async function until<T>(get: () => T | undefined, timeoutMs = 5000): Promise<T> {
  const start = Date.now();
  for (;;) {
    const v = get();
    if (v !== undefined) return v;
    if (Date.now() - start > timeoutMs) throw new Error('timed out waiting');
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
}

async function freePort(): Promise<number> {
  const s = createServer();
  await new Promise<void>((resolve) => s.listen(0, '127.0.0.1', () => resolve()));
  const port = (s.address() as { port: number }).port;
  await new Promise<void>((resolve) => s.close(() => resolve()));
  return port;
}

const urlIn = (lines: readonly string[]): string | undefined => lines.join('\n').match(/ws:\/\/[\d.]+:\d+/)?.[0];

describe('parseSimulateArgs', () => {
  it('asks for exactly one of --listen and --connect', () => {
    for (const argv of [[], ['--listen', '1', '--connect', 'ws://x:1']]) {
      const p = parseSimulateArgs(argv);
      expect(p.ok).toBe(false);
      if (!p.ok) expect(p.problems).toContain('give exactly one of --listen [HOST:]PORT (serve the stream) or --connect URL (push it to a server)');
    }
  });

  it('lists every bad value with what is accepted', () => {
    const p = parseSimulateArgs(['--listen', '0', '--scenario', 'swim', '--rate', 'fast', '--duration=-1', '--seed', '1.5', '--muscles', 'a,,b']);
    expect(p).toEqual({
      ok: false,
      problems: [
        '--scenario "swim": give one of walk, run',
        '--rate "fast": give samples per second, 1–2000',
        '--duration "-1" is not a duration: give seconds above 0, e.g. 60',
        '--seed "1.5": give a whole number, e.g. --seed 7',
        '--muscles "a,,b": give names separated by commas, e.g. --muscles calf,thigh',
      ],
    });
    const unknown = parseSimulateArgs(['--listen', '0', '--colour']);
    expect(unknown.ok).toBe(false);
    if (!unknown.ok) expect(unknown.problems[0]).toMatch(/`--colour`: unknown option\n\(lengthwise simulate --help lists every option\)/);
    const near = parseSimulateArgs(['--listen', '0', '--scenaro', 'run']);
    expect(near.ok).toBe(false);
    if (!near.ok) expect(near.problems[0]).toContain('`--scenaro`: unknown option; did you mean `--scenario`?');
  });

  it('turns good options into simulator options', () => {
    expect(parseSimulateArgs(['--connect', 'ws://127.0.0.1:9', '--scenario', 'run', '--rate', '50', '--muscles', 'x, y', '--faults', '--duration', '3', '--seed', '4'])).toEqual({
      ok: true,
      help: false,
      listen: null,
      connect: 'ws://127.0.0.1:9',
      token: null,
      sim: { scenario: 'run', rateHz: 50, durationS: 3, seed: 4, muscles: ['x', 'y'], faults: true },
    });
  });
});

describe('lengthwise simulate', () => {
  it('prints its help and exits 0', async () => {
    const t = testIo();
    expect(await run(['--help'], t.io)).toBe(0);
    expect(t.out.join('\n')).toMatch(/^usage: lengthwise simulate --listen \[HOST:\]PORT \| --connect URL/);
  });

  it('exits 2 with the problems on bad options, starting nothing', async () => {
    const t = testIo();
    expect(await run(['--listen', 'nine'], t.io)).toBe(2);
    expect(t.err.join('\n')).toMatch(/^lengthwise simulate: --listen "nine" is not an address: give PORT/);
  });

  it('serves a client for --duration seconds, then closes it and exits 0 with a summary', async () => {
    const t = testIo();
    const code = run(['--listen', '0', '--duration', '1', '--rate', '50'], t.io);
    const url = await until(() => urlIn(t.out));
    expect(t.out[0]).toBe(`serving a synthetic walk stream (calf, thigh at 50 Hz) on ${url}`);
    const collector = createCollector();
    const ws = new WebSocket(url);
    ws.on('message', (d) => collector.take(String(d)));
    const closed = new Promise<number>((resolve) => ws.on('close', (c) => resolve(c)));
    expect(await code).toBe(0);
    expect(await closed).toBe(1000);
    expect(collector.received.headers).toBe(1);
    expect(collector.received.bad).toEqual([]);
    const summary = t.err.find((l) => l.startsWith('simulate: sent'));
    expect(summary).toMatch(new RegExp(`^simulate: sent ${collector.received.samples} samples, \\d+ gait events, 0 markers, 1 headers and 0 malformed messages in \\d+ messages over 1 connection$`));
  });

  it('prints one line per fault on stderr with --faults', async () => {
    const t = testIo();
    const code = run(['--listen', '0', '--duration', '3.3', '--faults'], t.io);
    const url = await until(() => urlIn(t.out));
    const ws = new WebSocket(url);
    ws.on('error', () => {});
    expect(await code).toBe(0);
    expect(t.err.filter((l) => l.includes('] fault '))).toEqual([
      expect.stringMatching(/^\[3\.\d s\] fault malformed: sent a message the receiver should reject as not_json \(to 1 connection\)$/),
    ]);
  });

  it('pushes to a server with --connect and exits 0', async () => {
    const wss = new WebSocketServer({ host: '127.0.0.1', port: 0 });
    await new Promise<void>((resolve) => wss.once('listening', () => resolve()));
    const collector = createCollector();
    wss.on('connection', (ws) => ws.on('message', (d) => collector.take(String(d))));
    try {
      const url = `ws://127.0.0.1:${(wss.address() as { port: number }).port}`;
      const t = testIo();
      expect(await run(['--connect', url, '--duration', '0.8', '--scenario', 'run', '--muscles', 'left_calf'], t.io)).toBe(0);
      await until(() => (collector.received.headers > 0 && collector.received.timesByMuscle.size > 0 ? true : undefined));
      expect(collector.received.headers).toBe(1);
      expect([...collector.received.timesByMuscle.keys()]).toEqual(['left_calf']);
      expect(t.err.some((l) => l.includes(`connected to ${url}`))).toBe(true);
    } finally {
      await new Promise<void>((resolve) => wss.close(() => resolve()));
    }
  });

  /** A receiving server asking for a token (the live adapter, on a real socket); its URL and what it received. */
  async function tokenServer(token: string) {
    const frames: Frame[] = [];
    let url = '';
    const sub = websocketServer({ port: 0, token, onLink: (e) => (e.kind === 'listening' ? (url = e.url) : undefined) }).subscribe((b) => frames.push(...b));
    await until(() => (url === '' ? undefined : url));
    return { url, frames, stop: () => sub.unsubscribe() };
  }

  it('pushes with --token to a server that asks for one', async () => {
    const server = await tokenServer('lab-7');
    try {
      const t = testIo();
      expect(await run(['--connect', server.url, '--token', 'lab-7', '--duration', '0.8'], t.io)).toBe(0);
      await until(() => (server.frames.some((f) => f.kind === 'header') ? true : undefined));
      expect(t.err.join('\n')).not.toMatch(/refused/);
    } finally {
      server.stop();
    }
  });

  it('says a refusal (401) with the server\'s reason, stops pushing and exits 1', async () => {
    const server = await tokenServer('lab-7');
    try {
      // No --duration: the refusal ends it.
      for (const [args, hint] of [
        [[], "give the server's token with --token T"],
        [['--token', 'wrong'], "check that --token is the server's token"],
      ] as const) {
        const t = testIo();
        expect(await run(['--connect', server.url, ...args], t.io)).toBe(1);
        expect(t.err.at(-1)).toBe(
          `lengthwise simulate: ${server.url} refused the connection: HTTP 401 Unauthorized: Unauthorized: send "Authorization: Bearer TOKEN" or ?token=TOKEN; ${hint}`,
        );
      }
      expect(server.frames).toEqual([]);
    } finally {
      server.stop();
    }
  });

  it('never shows a token given in the URL', async () => {
    const server = await tokenServer('lab-secret-9');
    try {
      const t = testIo();
      expect(await run(['--connect', `${server.url}/?token=lab-secret-9`, '--duration', '0.8'], t.io)).toBe(0);
      await until(() => (server.frames.some((f) => f.kind === 'header') ? true : undefined));
      const said = [...t.out, ...t.err].join('\n');
      expect(said).toContain(`${server.url}/?token=***`);
      expect(said).not.toContain('lab-secret-9');
      const refused = testIo();
      expect(await run(['--connect', `${server.url}/?token=wrong-secret`], refused.io)).toBe(1);
      expect([...refused.out, ...refused.err].join('\n')).not.toContain('wrong-secret');
    } finally {
      server.stop();
    }
  });

  it('takes --token only with --connect', () => {
    expect(parseSimulateArgs(['--listen', '0', '--token', 'x'])).toMatchObject({ ok: false, problems: ['--token is for --connect (the token the server asks for)'] });
  });

  it('exits 1 when --connect never reached a server', async () => {
    const port = await freePort();
    const t = testIo();
    expect(await run(['--connect', `ws://127.0.0.1:${port}`, '--duration', '0.4'], t.io)).toBe(1);
    expect(t.err.at(-1)).toBe(
      `lengthwise simulate: never connected to ws://127.0.0.1:${port}; check that a server listens there (e.g. lengthwise live --listen PORT)`,
    );
  });

  it('exits 1 when the port is taken', async () => {
    const blocker = createServer();
    await new Promise<void>((resolve) => blocker.listen(0, '127.0.0.1', () => resolve()));
    const port = (blocker.address() as { port: number }).port;
    try {
      const t = testIo();
      expect(await run(['--listen', String(port)], t.io)).toBe(1);
      expect(t.err[0]).toMatch(/^lengthwise simulate: cannot listen on 127\.0\.0\.1:\d+ \(EADDRINUSE\)/);
    } finally {
      await new Promise<void>((resolve) => blocker.close(() => resolve()));
    }
  });

  it('runs until SIGINT as a real process, then closes its clients cleanly and exits 0', async () => {
    const c = lengthwise(['simulate', '--listen', '0'], { cwd: REPO, env: process.env });
    try {
      const url = await until(() => urlIn([c.stdout]), 15_000);
      const collector = createCollector();
      const ws = new WebSocket(url);
      ws.on('message', (d) => collector.take(String(d)));
      const closed = new Promise<number>((resolve) => ws.on('close', (c) => resolve(c)));
      await until(() => (collector.received.samples > 20 ? true : undefined));
      c.child.kill('SIGINT');
      expect((await c.exited).code).toBe(0);
      expect(await closed).toBe(1000);
      expect(c.stderr).toMatch(/SIGINT received, closing connections/);
    } finally {
      killChild(c);
    }
  });
});
