import { mkdtemp, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { lastValueFrom, Subject, toArray, VirtualAction, VirtualTimeScheduler, throwError } from 'rxjs';
import { describe, expect, it } from 'vitest';
import { decodeMessage } from '../../adapters/device-mapping.ts';
import { fileSource } from '../../adapters/file-source.ts';
import { openSessionLog } from '../../src/session-log/session-log.ts';
import { writeSessionLog } from '../../src/session-log/write-session-log.ts';
import type { Batch } from '../../src/trial/records.ts';
import { runBatches } from '../helpers/frames.ts';

async function newLog() {
  const path = join(await mkdtemp(join(tmpdir(), 'lengthwise-write-log-')), 'log.ndjson');
  const scheduler = new VirtualTimeScheduler(VirtualAction, 0);
  return { path, scheduler, log: openSessionLog({ path, scheduler }) };
}

describe('writeSessionLog', () => {
  it('writes nothing for an empty source', async () => {
    const { path, scheduler, log } = await newLog();
    expect(await runBatches(writeSessionLog(log, scheduler), [])).toEqual([]);
    log.close();
    expect(await readFile(path, 'utf8')).toBe('');
  });

  it('passes each batch through unchanged and writes one line per input frame, in order, with the receive time', async () => {
    const { path, scheduler, log } = await newLog();
    const one = decodeMessage('{"t": 0.5, "muscle": "calf", "fascicle_mm": 50}', 1);
    const many = decodeMessage('[{"t": 0.6, "muscle": "calf", "fascicle_mm": 51}, {"t": 0.6, "event": "toe_off", "side": "left"}, "junk"]', 2);
    const gap: Batch = [{ kind: 'gap', cause: 'disconnected', muscle: null, fromS: 0.6, toS: Number.NaN }];
    const out = await runBatches(writeSessionLog(log, scheduler), [one, many, gap]);
    expect(out[0]).toBe(one);
    expect(out[1]).toBe(many);
    log.close();
    const lines = (await readFile(path, 'utf8')).trimEnd().split('\n').map((l) => JSON.parse(l));
    expect(lines.map((l) => l.t ?? l.rejected)).toEqual([0.5, 0.6, 0.6, 'schema']);
    for (const l of lines) expect(l.rx).toBe(0);
  });

  it('sums the rejections of a flush up by reason: one line each, with the count and the first one\'s message, which a replay counts again', async () => {
    const { path, scheduler, log } = await newLog();
    const bad = decodeMessage(`[${Array.from({ length: 1000 }, () => '1').join(',')}]`, 1);
    const batches = [decodeMessage('{"t": 0.5, "muscle": "calf"', 1), bad, decodeMessage('{"t": 0.6, "muscle": "calf", "fascicle_mm": 51}', 2), decodeMessage('nope', 3)];
    await runBatches(writeSessionLog(log, scheduler), batches);
    log.close();
    const lines = (await readFile(path, 'utf8')).trimEnd().split('\n').map((l) => JSON.parse(l));
    expect(lines).toEqual([
      { t: 0.6, muscle: 'calf', fascicle_mm: 51, rx: 0 },
      { rejected: 'not_json', count: 2, rx: 0, message: expect.stringContaining('not valid JSON'), excerpt: '{"t": 0.5, "muscle": "calf"' },
      { rejected: 'schema', count: 1000, rx: 0, message: expect.stringContaining('line is 1, not a record'), excerpt: '1' },
    ]);
    const replayed = (await lastValueFrom(fileSource(path).pipe(toArray()))).flat();
    expect(replayed.map((f) => (f.kind === 'rejection' ? `${f.reason} ${f.count ?? 1}` : f.kind))).toEqual(['sample', 'not_json 2', 'schema 1000']);
  });

  it('passes on a record whose line would be longer than the log may hold as the line_too_long rejection a replay of the log finds', async () => {
    const { path, scheduler, log } = await newLog();
    // 400 KiB of bytes that are not UTF-8 in a muscle name: each reads as U+FFFD, three bytes in the log.
    const name = Buffer.alloc(400 * 1024, 0xff);
    const message = Buffer.concat([Buffer.from('[{"t": 1, "muscle": "'), name, Buffer.from('", "fascicle_mm": 50}, {"t": 1, "muscle": "calf", "fascicle_mm": 50}]')]);
    const frames = decodeMessage(message.toString('utf8'), 1);
    expect(frames.map((f) => f.kind)).toEqual(['sample', 'sample']);
    const [out] = await runBatches(writeSessionLog(log, scheduler), [frames]);
    expect(out?.map((f) => (f.kind === 'rejection' ? f.reason : f.kind))).toEqual(['line_too_long', 'sample']);
    expect(out?.[0]).toMatchObject({ message: expect.stringMatching(/^sample is \d+ bytes long as a line of the session log/) });
    log.close();
    const replayed = (await lastValueFrom(fileSource(path).pipe(toArray()))).flat();
    expect(replayed.map((f) => (f.kind === 'rejection' ? f.reason : f.kind))).toEqual(['sample', 'line_too_long']);
  });

  it('propagates an error from upstream after writing what came before', async () => {
    const { path, scheduler, log } = await newLog();
    const source = new Subject<Batch>();
    const errors: unknown[] = [];
    source.pipe(writeSessionLog(log, scheduler)).subscribe({ error: (e) => errors.push(e) });
    source.next(decodeMessage('{"t": 1, "marker": "before"}', 1));
    source.error(new Error('socket gone'));
    log.close();
    expect(errors).toHaveLength(1);
    expect(await readFile(path, 'utf8')).toContain('"marker":"before"');
    await expect(runBatches(() => throwError(() => new Error('x')).pipe(writeSessionLog(log, scheduler)), [])).rejects.toThrow('x');
  });

  it('unsubscribes from its source when unsubscribed early', async () => {
    const { scheduler, log } = await newLog();
    const source = new Subject<Batch>();
    const sub = source.pipe(writeSessionLog(log, scheduler)).subscribe();
    expect(source.observed).toBe(true);
    sub.unsubscribe();
    expect(source.observed).toBe(false);
    log.close();
  });
});
