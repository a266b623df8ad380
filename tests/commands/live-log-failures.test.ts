import { mkdir, mkdtemp, readdir, readFile, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { sampleTexts, sendAll, until, wsClient } from '../adapters/ws-peers.ts';
import { BIN, killChild, lengthwise, listeningPort, readJson, spawnChild, type Child } from '../helpers/command-child.ts';
import { NO_SMALL_DISK, onSmallDisk } from '../helpers/small-disk.ts';

const children: Child[] = [];
const stops: (() => unknown)[] = [];
afterEach(async () => {
  for (const c of children.splice(0)) killChild(c);
  while (stops.length > 0) await stops.pop()?.();
});

function track(c: Child): Child {
  children.push(c);
  return c;
}

/** Sends `n` samples from a device in messages of 50, then leaves; the session then ends on SIGTERM. */
async function feedAndEnd(c: Child, n: number): Promise<{ code: number | null }> {
  const ws = await wsClient(`ws://127.0.0.1:${await listeningPort(c)}`);
  stops.push(() => ws.terminate());
  const texts = sampleTexts(n);
  for (let i = 0; i < n; i += 50) await sendAll(ws, [`[${texts.slice(i, i + 50).join(',')}]`]);
  ws.close();
  await until(() => /DISCONNECTED/.test(c.stderr), 15_000, 'the device to leave');
  c.child.kill('SIGTERM');
  return c.exited;
}

describe('a live session whose log cannot be written in full', () => {
  it('refuses a --log file that exists already, before any work, and leaves it as it was', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-log-exists-'));
    const log = join(dir, 'old.ndjson');
    await writeFile(log, '{"t":0,"marker":"an earlier session"}\n');
    const c = track(lengthwise(['live', '--listen', '127.0.0.1:0', '--plain', '--log', log]));
    expect((await c.exited).code).toBe(2);
    expect(c.stderr).toMatch(/session log .*old\.ndjson exists already.*give --log a new name/);
    expect(c.stderr).not.toMatch(/listening/);
    expect(await readFile(log, 'utf8')).toBe('{"t":0,"marker":"an earlier session"}\n');
  });

  it('gives two sessions started at once in one folder a default log each, and each its summary', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-log-names-'));
    const a = track(lengthwise(['live', '--listen', '127.0.0.1:0', '--plain', '--duration', '1'], { cwd: dir }));
    const b = track(lengthwise(['live', '--listen', '127.0.0.1:0', '--plain', '--duration', '1'], { cwd: dir }));
    expect((await a.exited).code, a.stderr).toBe(0);
    expect((await b.exited).code, b.stderr).toBe(0);
    const files = (await readdir(join(dir, 'sessions'))).sort();
    expect(files.filter((f) => !f.endsWith('.summary.json'))).toHaveLength(2);
    expect(files.filter((f) => f.endsWith('.summary.json'))).toHaveLength(2);
  });

  it.skipIf(NO_SMALL_DISK !== null)(
    `on a full disk: says so, goes on, writes the summary with the warning and exits 1${NO_SMALL_DISK === null ? '' : ` (skipped: ${NO_SMALL_DISK})`}`,
    async () => {
      const dir = await mkdtemp(join(tmpdir(), 'lengthwise-log-full-'));
      const disk = join(dir, 'disk');
      await mkdir(disk);
      const summary = join(dir, 'live.json');
      const [program, args] = onSmallDisk(disk, 16, process.execPath, [BIN, 'live', '--listen', '127.0.0.1:0', '--plain', '--log', join(disk, 's.ndjson'), '--summary', summary]);
      const c = track(spawnChild(program, args));
      const { code } = await feedAndEnd(c, 1000);
      expect(code, c.stderr).toBe(1);
      expect(c.stderr).toMatch(/session log .*s\.ndjson could not be written \(ENOSPC: the disk is full/);
      const written = await readJson(summary);
      expect(written.frames).toMatchObject({ accepted: 1000 });
      expect((written['warnings'] as string[]).some((w) => /session log is incomplete/.test(w))).toBe(true);
    },
  );

  it.skipIf(NO_SMALL_DISK !== null)(
    `on a full disk with no --summary: the summary goes to the temporary folder, and the session says where${NO_SMALL_DISK === null ? '' : ` (skipped: ${NO_SMALL_DISK})`}`,
    async () => {
      const dir = await mkdtemp(join(tmpdir(), 'lengthwise-log-full-'));
      const disk = join(dir, 'disk');
      await mkdir(disk);
      const [program, args] = onSmallDisk(disk, 16, process.execPath, [BIN, 'live', '--listen', '127.0.0.1:0', '--plain', '--log', join(disk, 's.ndjson')]);
      const c = track(spawnChild(program, args));
      const { code } = await feedAndEnd(c, 1000);
      expect(code, c.stderr).toBe(1);
      const moved = /summary written to (\S+) instead/.exec(c.stderr)?.[1];
      expect(moved, c.stderr).toBeDefined();
      stops.push(() => rm(moved as string, { force: true }));
      const written = await readJson(moved as string);
      expect(written.frames).toMatchObject({ accepted: 1000 });
      expect((written['warnings'] as string[]).some((w) => /session log is incomplete/.test(w))).toBe(true);
    },
  );
});
