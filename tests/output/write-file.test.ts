import { execFileSync, spawn } from 'node:child_process';
import { lstatSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { writeFileAtomic } from '../../src/output/write-file.ts';

const dir = mkdtempSync(join(tmpdir(), 'lengthwise-write-file-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('writeFileAtomic', () => {
  it('writes a whole file, creating its folder, and leaves no temporary file', async () => {
    const path = join(dir, 'a', 'b', 'summary.json');
    expect(await writeFileAtomic(path, '{"x": 1}\n')).toEqual({ ok: true, path });
    expect(readFileSync(path, 'utf8')).toBe('{"x": 1}\n');
    expect(readdirSync(join(dir, 'a', 'b'))).toEqual(['summary.json']);
  });

  it('writes into a named pipe as it is, and the pipe stays a pipe (a device such as /dev/null is never replaced)', async () => {
    const fifo = join(dir, 'pipe');
    execFileSync('mkfifo', [fifo]);
    // A reader at the other end, in another process, so the write can complete.
    const reader = spawn('cat', [fifo]);
    let got = '';
    reader.stdout.on('data', (d: Buffer) => (got += d.toString()));
    const done = new Promise<void>((resolve) => reader.on('exit', () => resolve()));
    expect((await writeFileAtomic(fifo, 'through the pipe\n')).ok).toBe(true);
    await done;
    expect(got).toBe('through the pipe\n');
    expect(lstatSync(fifo).isFIFO()).toBe(true);
    expect(readdirSync(dir).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });
});
