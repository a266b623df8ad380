import { BehaviorSubject, lastValueFrom, toArray } from 'rxjs';
import { setTimeout as sleep } from 'node:timers/promises';
import { paceReplay, readAheadValve } from '../../src/pipeline/pace-replay.ts';
import { afterAll, describe, expect, it } from 'vitest';
import { detectFormat, fileSource, SourceFormatError } from '../../adapters/file-source.ts';
import { parseDeviceMapping } from '../../adapters/device-mapping.ts';
import { LineReadError } from '../../adapters/read-lines.ts';
import type { Batch, Frame } from '../../src/trial/records.ts';
import { stringify } from 'csv-stringify/sync';
import { csvTrial, ndjsonTrial, tempDir } from './invented-trial.ts';

const tmp = tempDir();
afterAll(() => tmp.remove());

async function batchesOf(path: string, options?: Parameters<typeof fileSource>[1]): Promise<Batch[]> {
  return lastValueFrom(fileSource(path, options).pipe(toArray()));
}

function tally(frames: readonly Frame[]): Record<string, number> {
  const counts: Record<string, number> = {};
  for (const f of frames) {
    const key = f.kind === 'rejection' ? `rejection:${f.reason}` : f.kind;
    counts[key] = (counts[key] ?? 0) + 1;
  }
  return counts;
}

describe('fileSource', () => {
  it('completes with no batches for an empty file', async () => {
    expect(await batchesOf(tmp.file('empty.ndjson', ''))).toEqual([]);
  });

  it('reads a one-line file', async () => {
    const batches = await batchesOf(tmp.file('one.ndjson', '{"t":0,"muscle":"calf","fascicle_mm":50}'));
    expect(batches).toHaveLength(1);
    expect(batches[0]).toMatchObject([{ kind: 'sample', line: 1 }]);
  });

  it('gives one frame per non-blank line, in file order, one batch per line batch, for a file larger than the batch size', async () => {
    const lines = ndjsonTrial(3000);
    const batches = await batchesOf(tmp.file('trial.ndjson', `${lines.join('\n')}\n`), { batchLines: 1024 });
    expect(lines).toHaveLength(3031);
    expect(batches.map((b) => b.length)).toEqual([1024, 1024, 983]);
    const frames = batches.flat();
    expect(frames.map((f) => ('line' in f ? f.line : -1))).toEqual(lines.map((_, i) => i + 1));
    expect(tally(frames)).toEqual({ header: 1, event: 30, sample: 3000 });
  });

  it('counts bad lines exactly, by reason, and goes on past them', async () => {
    const content = [
      '{"format":"lengthwise-stream","version":1}',
      '{"t":0,"muscle":"calf","fascicle_mm":50}',
      '',
      'not json at all',
      '{"t":0.01,"muscle":"calf","fascicle_mm":-3}',
      '{"t":0.02,"muscle":"calf","fascicle_mm":50,"pennation_deg":120}',
      '{"t":0.03,"event":"heel_off","side":"left"}',
      '{"t":0.04,"marker":"m","__proto__":{"polluted":true}}',
      `{"t":0.05,"marker":"m","x":${'['.repeat(20)}${']'.repeat(20)}}`,
      '{"t":0.06,"muscle":"calf"}',
      `{"t":0.07,"marker":"${'z'.repeat(3000)}"}`,
      '   ',
      '{"format":"lengthwise-stream","version":1}',
      '{"t":0.08,"muscle":"calf","fascicle_mm":51}',
    ].join('\r\n');
    const frames = (await batchesOf(tmp.file('bad.ndjson', content), { maxLineBytes: 2048 })).flat();
    expect(tally(frames)).toEqual({
      header: 2,
      sample: 2,
      'rejection:not_json': 1,
      'rejection:out_of_range': 2,
      'rejection:unknown_event': 1,
      'rejection:unsafe_key': 1,
      'rejection:too_deep': 1,
      'rejection:schema': 1,
      'rejection:line_too_long': 1,
    });
    expect(frames.find((f) => f.kind === 'rejection' && f.reason === 'line_too_long')).toMatchObject({ line: 11 });
    expect(frames.at(-1)).toMatchObject({ kind: 'sample', line: 14 });
    expect(({} as Record<string, unknown>)['polluted']).toBeUndefined();
  });

  it('reads CSV by its extension, header row first', async () => {
    const lines = csvTrial(250);
    const frames = (await batchesOf(tmp.file('trial.csv', `${lines.join('\n')}\n`), { batchLines: 100 })).flat();
    expect(frames).toHaveLength(lines.length);
    expect(tally(frames)).toEqual({ header: 1, event: 3, sample: 250 });
  });

  it('reads CSV by its first line when the name says nothing', async () => {
    const frames = (await batchesOf(tmp.file('trial.txt', 'time_s,muscle,fascicle_mm\n0,calf,50\n0.01,calf,-1\n'))).flat();
    expect(frames.map((f) => (f.kind === 'rejection' ? f.reason : f.kind))).toEqual(['header', 'sample', 'out_of_range']);
  });

  it('errors once, with a SourceFormatError, when a CSV header row lacks a required column', async () => {
    const error: unknown = await batchesOf(tmp.file('bad-header.csv', 'time_s,muscle\n0,calf\n')).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(SourceFormatError);
    expect(error).toMatchObject({ line: 1 });
    expect((error as Error).message).toContain('lacks column "fascicle_mm"');
  });

  it('keeps the first header row\'s columns to the end of a CSV file: a bare time_s line or a swapped header row mid-file is one rejected line', async () => {
    const content = stringify([
      ['time_s', 'muscle', 'fascicle_mm', 'pennation_deg'],
      ['0', 'calf', '50', '20'],
      ['time_s'],
      ['0.01', 'calf', '51', '21'],
      ['time_s', 'muscle', 'pennation_deg', 'fascicle_mm'],
      ['0.02', 'calf', '52', '22'],
      ['time_s', 'muscle', 'fascicle_mm', 'pennation_deg'],
      ['0.03', 'calf', '53', '23'],
    ]);
    const frames = (await batchesOf(tmp.file('joined.csv', content))).flat();
    expect(frames.map((f) => (f.kind === 'rejection' ? f.reason : f.kind))).toEqual(['header', 'sample', 'schema', 'sample', 'schema', 'sample', 'header', 'sample']);
    const samples = frames.filter((f) => f.kind === 'sample');
    expect(samples.map((f) => [f.fascicleMm, f.pennationDeg])).toEqual([
      [50, 20],
      [51, 21],
      [52, 22],
      [53, 23],
    ]);
  });

  it('errors with a LineReadError when the file is missing', async () => {
    const error: unknown = await batchesOf(`${tmp.dir}/missing.ndjson`).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(LineReadError);
    expect(error).toMatchObject({ code: 'ENOENT' });
  });

  it('stops reading when unsubscribed early', async () => {
    const path = tmp.file('long.ndjson', `${ndjsonTrial(50_000).join('\n')}\n`);
    const seen: Batch[] = [];
    await new Promise<void>((resolve) => {
      const subscription = fileSource(path, { batchLines: 10 }).subscribe((batch) => {
        seen.push(batch);
        subscription.unsubscribe();
        setTimeout(resolve, 50);
      });
    });
    expect(seen).toHaveLength(1);
  });

  it('stops reading while paused, and goes on when resumed', async () => {
    const path = tmp.file('paused.ndjson', `${ndjsonTrial(20_000).join('\n')}\n`);
    const pause$ = new BehaviorSubject(true);
    let frames = 0;
    const done = new Promise<void>((resolve, reject) => {
      fileSource(path, { pause$, chunkBytes: 4096 }).subscribe({ next: (b) => (frames += b.length), complete: resolve, error: reject });
    });
    await sleep(100);
    // At most the chunk in hand when the pause took effect.
    expect(frames).toBeLessThan(200);
    pause$.next(false);
    await done;
    expect(frames).toBe(20_201);
  });

  it('keeps a paced replay from reading far ahead, with a read-ahead valve', async () => {
    // 20 000 samples at 100 Hz are 200 s of device time: 0.2 s of wall time at speed 1000.
    const path = tmp.file('valve.ndjson', `${ndjsonTrial(20_000).join('\n')}\n`);
    const valve = readAheadValve(1000, 250);
    let most = 0;
    const frames = await lastValueFrom(
      fileSource(path, { pause$: valve.pause$, chunkBytes: 4096, batchLines: 64 }).pipe(
        paceReplay(1000, undefined, {
          onBacklog: (n) => {
            most = Math.max(most, n);
            valve.report(n);
          },
        }),
        toArray(),
      ),
    );
    expect(frames.flat()).toHaveLength(20_201);
    expect(most).toBeLessThan(1000 + 200);
  });

  it('can be told the format', async () => {
    const path = tmp.file('forced.csv', '{"t":0,"marker":"m"}\n');
    expect((await batchesOf(path, { format: 'ndjson' })).flat()).toMatchObject([{ kind: 'marker' }]);
  });
});

describe('fileSource reading tables in any layout', () => {
  const layouts = [',', ';', '\t', '|'].flatMap((delimiter) => (delimiter === ',' ? ['.'] : ['.', ',']).map((decimal) => ({ delimiter, decimal })));
  const num = (x: number, decimal: string): string => String(x).replace('.', decimal);

  it.each(layouts)('reads a long and a wide table split at $delimiter with decimal mark $decimal, under notes, with CRLF and a byte-order mark', async ({ delimiter, decimal }) => {
    const notes = '\uFEFFInvented export, station 4\r\nunits in the header\r\n\r\n';
    const longPath = tmp.file(
      `long-${delimiter.charCodeAt(0)}-${decimal.charCodeAt(0)}.txt`,
      notes +
        stringify(
          [
            ['Time (s)', 'Muscle', 'Fascicle (mm)'],
            [num(0.5, decimal), 'calf', num(52.25, decimal)],
            [num(0.51, decimal), 'calf, medial', num(52.5, decimal)],
          ],
          { delimiter, record_delimiter: '\r\n' },
        ),
    );
    const long = parseDeviceMapping({ format: 'lengthwise-mapping', version: 1, fields: { t: 'Time (s)', muscle: 'Muscle', fascicle: 'Fascicle (mm)' } });
    const widePath = tmp.file(
      `wide-${delimiter.charCodeAt(0)}-${decimal.charCodeAt(0)}.txt`,
      notes + stringify([['t', 'A (mm)', 'B (mm)'], [num(0.5, decimal), num(41.5, decimal), num(60.25, decimal)], [num(0.51, decimal), '', num(60.5, decimal)]], { delimiter, record_delimiter: '\r\n' }),
    );
    const wide = parseDeviceMapping({ format: 'lengthwise-mapping', version: 1, fields: { t: 't' }, muscles: { a: { fascicle: 'A (mm)' }, b: { fascicle: 'B (mm)' } } });
    if (!long.ok || !wide.ok) throw new Error('bad mapping');
    const summary = (frames: Frame[]): string[] => frames.map((f) => (f.kind === 'sample' ? `${f.muscle}@${f.tS}=${f.fascicleMm}` : f.kind));
    expect(summary((await batchesOf(longPath, { mapping: long.mapping })).flat())).toEqual(['header', 'calf@0.5=52.25', 'calf, medial@0.51=52.5']);
    expect(summary((await batchesOf(widePath, { mapping: wide.mapping })).flat())).toEqual(['header', 'a@0.5=41.5', 'b@0.5=60.25', 'b@0.51=60.5']);
  });
});

describe('detectFormat', () => {
  it('picks CSV for a .csv name or a time_s first line, else NDJSON', () => {
    expect(detectFormat('a/B.CSV', '{}')).toBe('csv');
    expect(detectFormat('a/b.ndjson', 'time_s,muscle')).toBe('csv');
    expect(detectFormat('a/b.ndjson', '"time_s","muscle"')).toBe('csv');
    expect(detectFormat('a/b', '{"t":0}')).toBe('ndjson');
  });
});
