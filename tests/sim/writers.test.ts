import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTrial } from '../../src/sim/gait-generator.ts';
import { scenarioSpec } from '../../src/sim/scenarios.ts';
import { CSV_HEADER_ROW, csvLine, ndjsonLine, toCsv, toNdjson, writeCsv, writeNdjson } from '../../src/sim/writers.ts';
import type { WireItem } from '../../src/sim/wire.ts';

let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-writers-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

const ITEMS: WireItem[] = [
  { format: 'lengthwise-stream', version: 1, muscles: { calf: { side: 'left' } } },
  { t: 0.01, muscle: 'calf', fascicle_mm: 45.1, pennation_deg: 21.5, quality: 0.95 },
  { t: 0.02, muscle: 'calf', fascicle_mm: 45.2 },
  { t: 0.025, event: 'foot_strike', side: 'left' },
  { t: 0.03, marker: 'belt on' },
  '{"t":0.04,"muscle":"calf"',
];

describe('ndjsonLine and toNdjson', () => {
  it('write nothing for no items', () => {
    expect(toNdjson([])).toBe('');
    expect(toCsv([])).toBe(`${CSV_HEADER_ROW}\n`);
  });

  it('write each record as JSON.stringify would, and a bad line as it is', () => {
    for (const item of ITEMS) {
      expect(ndjsonLine(item)).toBe(typeof item === 'string' ? item : JSON.stringify(item));
    }
    expect(toNdjson(ITEMS).split('\n')).toHaveLength(ITEMS.length + 1);
  });

  it('fall back to JSON for a sample with a value JSON cannot hold', () => {
    expect(ndjsonLine({ t: 1, muscle: 'calf', fascicle_mm: Number.NaN })).toBe('{"t":1,"muscle":"calf","fascicle_mm":null}');
  });
});

describe('csvLine and toCsv', () => {
  it('write samples and events as rows of seven columns, and skip the header and markers', () => {
    expect(toCsv(ITEMS)).toBe(
      [CSV_HEADER_ROW, '0.01,calf,45.1,21.5,0.95,,', '0.02,calf,45.2,,,,', '0.025,,,,,foot_strike,left', '{"t":0.04,"muscle":"calf"', ''].join('\n'),
    );
  });

  it('quote a muscle name holding a comma', () => {
    expect(csvLine({ t: 1, muscle: 'calf, deep', fascicle_mm: 40 })).toBe('1,"calf, deep",40,,,,');
  });
});

describe('writeNdjson and writeCsv', () => {
  it('stream a trial to disk with the same bytes as the string forms', async () => {
    const trial = createTrial(scenarioSpec('run', { durationS: 30 }));
    const nd = await writeNdjson(trial.records(), join(dir, 'a.ndjson'));
    const csv = await writeCsv(trial.records({ badLines: 'csv' }), join(dir, 'a.csv'));
    expect(nd.ok && csv.ok).toBe(true);
    expect(await readFile(join(dir, 'a.ndjson'), 'utf8')).toBe(toNdjson(trial.records()));
    expect(await readFile(join(dir, 'a.csv'), 'utf8')).toBe(toCsv(trial.records({ badLines: 'csv' })));
    if (nd.ok) expect(nd.lines).toBe(toNdjson(trial.records()).split('\n').length - 1);
  });

  it('write an empty file for no items', async () => {
    const r = await writeNdjson([], join(dir, 'empty.ndjson'));
    expect(r).toEqual({ ok: true, path: join(dir, 'empty.ndjson'), lines: 0, bytes: 0 });
    expect(await readFile(join(dir, 'empty.ndjson'), 'utf8')).toBe('');
  });

  it('report a folder that does not exist as data, without throwing', async () => {
    const path = join(dir, 'no-such-folder', 'x.ndjson');
    const r = await writeNdjson(createTrial(scenarioSpec('walk', { durationS: 5 })).records(), path);
    expect(r).toEqual({ ok: false, path, problem: `cannot write ${path} (ENOENT); check that its folder exists and is writable` });
  });
});
