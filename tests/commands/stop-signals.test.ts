import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { until } from '../adapters/ws-peers.ts';
import { killChild, lengthwise, readJson, type Child } from '../helpers/command-child.ts';

const ROOT = join(import.meta.dirname, '..', '..');
const DEMO = join(ROOT, 'replays', 'demo-walk.ndjson');

const children: Child[] = [];
afterEach(() => {
  for (const c of children.splice(0)) killChild(c);
});

describe('Ctrl+C or SIGTERM on a replay with no terminal for keys', () => {
  it.each(['SIGINT', 'SIGTERM'] as const)('%s stops it as q does: the summary and the stride table are written, exit 0', async (signal) => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-signal-'));
    const summary = join(dir, 's.json');
    const strides = join(dir, 'x.csv');
    const c = lengthwise(['replay', DEMO, '--speed', '1', '--plain', '--summary', summary, '--strides', strides]);
    children.push(c);
    // The first status line (after 3 s of the trial) says it is playing.
    await until(() => / \| /.test(c.stderr), 20_000, `a status line (stderr: ${c.stderr})`);
    c.child.kill(signal);
    const { code } = await c.exited;
    expect(code, c.stderr).toBe(0);
    const written = await readJson(summary);
    expect(written.frames['accepted']).toBeGreaterThan(0);
    expect((await readFile(strides, 'utf8')).split('\r\n')[0]).toMatch(/^muscle,side,stride/);
    expect(c.stdout).toContain('samples accepted');
  });
});

const HAS_TMUX = spawnSync('tmux', ['-V'], { encoding: 'utf8' }).status === 0;

describe.skipIf(!HAS_TMUX)(`Ctrl+C on the dashboard of a replay whose input is not a terminal${HAS_TMUX ? '' : ' (skipped: tmux is not installed)'}`, () => {
  const socket = `lengthwise-signal-test-${process.pid}`;
  const tmux = (...args: string[]): string => execFileSync('tmux', ['-L', socket, ...args], { encoding: 'utf8' });
  afterEach(() => {
    spawnSync('tmux', ['-L', socket, 'kill-server']);
  });

  it('stops it as q does: the dashboard closes, the summary is written, exit 0', { timeout: 40_000 }, async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-signal-tty-'));
    const summary = join(dir, 's.json');
    const status = join(dir, 'status');
    const script = `cd '${ROOT}' && unset CI; export NO_COLOR=1; node bin/lengthwise.js replay '${DEMO}' --speed 1 --summary '${summary}' < /dev/null; echo $? > '${status}'; sleep 30`;
    tmux('new-session', '-d', '-s', 'replay', '-x', '100', '-y', '30', script);
    const screen = (): string => tmux('capture-pane', '-p', '-t', 'replay');
    await until(() => screen().includes('calf') && /\d+ samples/.test(screen()), 20_000, 'the dashboard with samples');
    tmux('send-keys', '-t', 'replay', 'C-c');
    await until(() => existsSync(status) && readFileSync(status, 'utf8').trim() !== '', 15_000, 'the exit status');
    expect(readFileSync(status, 'utf8').trim()).toBe('0');
    expect((await readJson(summary)).frames['accepted']).toBeGreaterThan(0);
  });
});

describe('Ctrl+C on summarize', () => {
  it('writes the table of the trials finished so far, names the rest as not summarised, and exits 1', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-signal-study-'));
    // A second "trial" of two million lines that are not JSON: reading it takes the worker a while.
    const slow = join(dir, 'slow.ndjson');
    await writeFile(slow, 'x\n'.repeat(2_000_000));
    const c = lengthwise(['summarize', DEMO, slow, '--jobs', '1', '--plain']);
    children.push(c);
    await until(() => /\[1\/2\]/.test(c.stderr), 30_000, `the first trial to finish (stderr: ${c.stderr})`);
    c.child.kill('SIGINT');
    const { code } = await c.exited;
    expect(code, c.stderr).toBe(1);
    expect(c.stderr).toMatch(/stopped by SIGINT: the table holds the 1 trials finished before it/);
    expect(c.stderr).toMatch(/summarized 1 of 2 trials .*; 1 failed: .*slow\.ndjson/);
    const table = c.stdout.trim().split(/\r?\n/);
    expect(table).toHaveLength(3);
    expect(table.slice(1).every((row) => row.includes('demo-walk.ndjson'))).toBe(true);
  });
});
