import { copyFile, mkdir, mkdtemp, readdir, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { killChild, lengthwise, spawnChild, BIN, type Child } from '../helpers/command-child.ts';
import { NO_SMALL_DISK, onSmallDisk } from '../helpers/small-disk.ts';

const DEMO = join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.ndjson');

const children: Child[] = [];
afterEach(() => {
  for (const c of children.splice(0)) killChild(c);
});

async function run(args: readonly string[]): Promise<Child & { code: number | null }> {
  const c = lengthwise(args);
  children.push(c);
  const { code } = await c.exited;
  return Object.assign(c, { code });
}

let dir = '';
let trial = '';
let demoText = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-outputs-'));
  trial = join(dir, 't.ndjson');
  await copyFile(DEMO, trial);
  demoText = await readFile(trial, 'utf8');
});

describe('an output path that would replace an input, the log or another output', () => {
  it('is refused before any work: `replay t.ndjson --summary t.ndjson` exits 2, says which and how to fix it, and the trial is intact', async () => {
    const r = await run(['replay', trial, '--speed', 'max', '--plain', '--summary', trial]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--summary .*t\.ndjson is the trial file .*give --summary another path/);
    expect(r.stdout).toBe('');
    expect(await readFile(trial, 'utf8')).toBe(demoText);
  });

  it('refuses two outputs that would be one file: --strides x.csv --report ./sub/../x.csv', async () => {
    await mkdir(join(dir, 'sub'), { recursive: true });
    const r = await run(['replay', trial, '--speed', 'max', '--plain', '--strides', join(dir, 'x.csv'), '--report', join(dir, 'sub', '..', 'x.csv')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--report .* is the same file as --strides .*give one of them another path/);
  });

  it('refuses a live summary that is its session log, before it listens', async () => {
    const log = join(dir, 's.ndjson');
    const r = await run(['live', '--listen', '127.0.0.1:0', '--plain', '--log', log, '--summary', log]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--summary .*s\.ndjson is the session log \(--log\)/);
    expect(r.stderr).not.toMatch(/listening/);
    expect(await readdir(dir)).not.toContain('s.ndjson');
  });

  it('refuses a study table written over one of the trials it reads', async () => {
    const second = join(dir, 't2.ndjson');
    await copyFile(DEMO, second);
    const r = await run(['summarize', trial, second, '--plain', '--out', second]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--out .*t2\.ndjson is a trial file/);
    expect(await readFile(second, 'utf8')).toBe(demoText);
  });
});

describe('an output that cannot be written', () => {
  it('is said, exits 1, and leaves no temporary file behind (the path is a folder)', async () => {
    const out = join(dir, 'a-folder');
    await mkdir(out, { recursive: true });
    const r = await run(['replay', trial, '--speed', 'max', '--plain', '--summary', out]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/could not write .*a-folder \(EISDIR\)/);
    expect((await readdir(dir)).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it.skipIf(NO_SMALL_DISK !== null)(`is said, exits 1, and leaves no temporary file behind on a full disk${NO_SMALL_DISK === null ? '' : ` (skipped: ${NO_SMALL_DISK})`}`, async () => {
    const disk = await mkdtemp(join(tmpdir(), 'lengthwise-full-'));
    const [program, args] = onSmallDisk(disk, 16, process.execPath, [BIN, 'replay', trial, '--speed', 'max', '--plain', '--summary', join(disk, 's.json')], `ls -A "$0"`);
    const c = spawnChild(program, args);
    children.push(c);
    const { code } = await c.exited;
    expect(code, c.stderr).toBe(1);
    expect(c.stderr).toMatch(/could not write .*s\.json \(ENOSPC\)/);
    // The listing of the small disk, made inside its namespace after the command ended: nothing left.
    expect(c.stdout.split('\n').filter((l) => l.endsWith('.tmp') || l === 's.json')).toEqual([]);
  });
});
