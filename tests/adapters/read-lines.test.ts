import { readdirSync, readlinkSync } from 'node:fs';
import { setTimeout as sleep } from 'node:timers/promises';
import { firstValueFrom, lastValueFrom, toArray } from 'rxjs';
import { afterAll, describe, expect, it } from 'vitest';
import { LineReadError, readLines, type LineBatch, type ReadLinesOptions } from '../../adapters/read-lines.ts';
import { tempDir } from './invented-trial.ts';

const tmp = tempDir();
afterAll(() => tmp.remove());

async function readAll(path: string, options?: ReadLinesOptions): Promise<LineBatch[]> {
  return lastValueFrom(readLines(path, options).pipe(toArray()));
}

async function linesOf(path: string, options?: ReadLinesOptions): Promise<Array<[number, string, number]>> {
  const batches = await readAll(path, options);
  return batches.flatMap((b) => b.texts.map((text, i): [number, string, number] => [b.lineNumbers[i] ?? -1, text, b.overLongBytes[i] ?? -1]));
}

function openFilesOf(path: string): number {
  return readdirSync('/proc/self/fd').filter((fd) => {
    try {
      return readlinkSync(`/proc/self/fd/${fd}`) === path;
    } catch {
      return false;
    }
  }).length;
}

describe('readLines', () => {
  it('completes with no batches for an empty file', async () => {
    expect(await readAll(tmp.file('empty.txt', ''))).toEqual([]);
  });

  it('delivers one line with no line ending', async () => {
    expect(await linesOf(tmp.file('one.txt', 'only line'))).toEqual([[1, 'only line', 0]]);
  });

  it('delivers many lines in batches of the batch size, numbered from 1', async () => {
    const lines = Array.from({ length: 2500 }, (_, i) => `line ${i + 1}`);
    const batches = await readAll(tmp.file('many.txt', `${lines.join('\n')}\n`), { batchLines: 1024 });
    expect(batches.map((b) => b.texts.length)).toEqual([1024, 1024, 452]);
    const all = batches.flatMap((b) => [...b.texts]);
    expect(all).toEqual(lines);
    expect(batches.flatMap((b) => [...b.lineNumbers])).toEqual(lines.map((_, i) => i + 1));
  });

  it('removes \\r of \\r\\n endings and a byte-order mark, skips blank lines but counts them', async () => {
    const path = tmp.file('crlf.txt', '\uFEFFfirst\r\n\r\n   \r\nsecond\r\n\nthird\r\n');
    expect(await linesOf(path)).toEqual([
      [1, 'first', 0],
      [4, 'second', 0],
      [6, 'third', 0],
    ]);
  });

  it('decodes UTF-8 characters split across chunks, whatever the chunk size', async () => {
    const content = 'größe µm\n→ 2.7 µm\n😀 emoji\r\nlast without ending é';
    const path = tmp.file('utf8.txt', content);
    const expected = await linesOf(path);
    expect(expected.map((l) => l[1])).toEqual(['größe µm', '→ 2.7 µm', '😀 emoji', 'last without ending é']);
    for (const chunkBytes of [1, 2, 3, 5, 7, 13]) {
      expect(await linesOf(path, { chunkBytes })).toEqual(expected);
    }
  });

  it('reports a line over the cap with its length and a short excerpt, and goes on with the next lines', async () => {
    const long = 'x'.repeat(5000);
    const path = tmp.file('long.txt', `before\n${long}\r\nafter\n${'é'.repeat(600)}`);
    for (const chunkBytes of [64, 1000, 1 << 16]) {
      const lines = await linesOf(path, { maxLineBytes: 1000, chunkBytes });
      expect(lines.map((l) => [l[0], l[2]])).toEqual([
        [1, 0],
        [2, 5000],
        [3, 0],
        [4, 1200],
      ]);
      const excerpt = lines[1]?.[1] ?? '';
      expect(excerpt.length).toBeGreaterThan(0);
      expect(excerpt.length).toBeLessThanOrEqual(200);
      expect(long.startsWith(excerpt)).toBe(true);
      expect(lines[2]?.[1]).toBe('after');
    }
  });

  it('accepts a line of exactly the cap', async () => {
    const path = tmp.file('cap.txt', `${'y'.repeat(100)}\n${'z'.repeat(101)}\n`);
    expect((await linesOf(path, { maxLineBytes: 100, chunkBytes: 7 })).map((l) => l[2])).toEqual([0, 101]);
  });

  it('reads a line many chunks long over the cap while holding only its start', async () => {
    // 8 MiB on one line with a 64 KiB cap: delivered as an excerpt and its byte count.
    const path = tmp.file('huge.txt', Buffer.concat([Buffer.alloc(8 << 20, 0x61), Buffer.from('\nnext\n')]));
    const lines = await linesOf(path, { maxLineBytes: 1 << 16, chunkBytes: 1 << 16 });
    expect(lines.map((l) => [l[0], l[2], l[1].length])).toEqual([
      [1, 8 << 20, 200],
      [2, 0, 4],
    ]);
  });

  it('errors with a LineReadError naming the path and code when the file is missing', async () => {
    const path = `${tmp.dir}/no-such-file.ndjson`;
    const error: unknown = await firstValueFrom(readLines(path)).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(LineReadError);
    expect(error).toMatchObject({ path, code: 'ENOENT' });
    expect((error as Error).message).toContain('check that the path is right');
  });

  it('errors with a LineReadError when the path is a directory', async () => {
    const error: unknown = await firstValueFrom(readLines(tmp.dir)).catch((e: unknown) => e);
    expect(error).toMatchObject({ name: 'LineReadError', code: 'EISDIR' });
  });

  it('closes the file when unsubscribed early', async () => {
    const path = tmp.file('big.txt', `${Array.from({ length: 200_000 }, (_, i) => `row ${i}`).join('\n')}\n`);
    const first = await new Promise<LineBatch>((resolve) => {
      const subscription = readLines(path, { batchLines: 10, chunkBytes: 1024 }).subscribe((batch) => {
        expect(openFilesOf(path)).toBe(1);
        subscription.unsubscribe();
        resolve(batch);
      });
    });
    expect(first.texts).toHaveLength(10);
    for (let i = 0; i < 50 && openFilesOf(path) > 0; i++) await sleep(10);
    expect(openFilesOf(path)).toBe(0);
  });

  it('refuses a batch size or cap that is not a whole number ≥ 1', () => {
    expect(() => readLines('x', { batchLines: 0 })).toThrow(/batchLines is 0: must be a whole number/);
    expect(() => readLines('x', { maxLineBytes: 1.5 })).toThrow(RangeError);
  });
});
