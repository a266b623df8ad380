import { execFile } from 'node:child_process';
import { mkdtemp, readFile, rm, stat } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { lastValueFrom, reduce } from 'rxjs';
import { parseCalibration } from '../../adapters/calibration-file.ts';
import { fileSource } from '../../adapters/file-source.ts';
import { DEFAULT_MAX_LINE_BYTES } from '../../adapters/read-lines.ts';
import { MAX_MESSAGE_CHARS } from '../../adapters/parse-record.ts';
import type { Frame } from '../../src/trial/records.ts';
import { DEMO_FILES, demoRunSpec, demoWalkSpec } from '../../src/sim/demo-trials.ts';
import { createTrial } from '../../src/sim/gait-generator.ts';
import { CSV_HEADER_ROW } from '../../src/sim/writers.ts';
import { orderPerMuscle } from '../../src/pipeline/order-per-muscle.ts';
import { createClassifier, type LineKind } from '../sim/stream-check.ts';

const run = promisify(execFile);
const REPO = join(import.meta.dirname, '..', '..');
const REPLAYS = join(REPO, 'replays');

let outA = '';
let outB = '';

beforeAll(async () => {
  outA = await mkdtemp(join(tmpdir(), 'lengthwise-replays-a-'));
  outB = await mkdtemp(join(tmpdir(), 'lengthwise-replays-b-'));
  for (const out of [outA, outB]) {
    await run(process.execPath, [join(REPO, 'bin', 'run-ts.js'), join(REPLAYS, 'make-replays.ts'), '--out', out], { cwd: REPO });
  }
});

afterAll(async () => {
  await rm(outA, { recursive: true, force: true });
  await rm(outB, { recursive: true, force: true });
});

function kindsOf(text: string, format: 'ndjson' | 'csv'): LineKind[] {
  const check = createClassifier(DEFAULT_MAX_LINE_BYTES);
  const lines = text.split('\n');
  expect(lines.pop()).toBe('');
  if (format === 'csv') expect(lines.shift()).toBe(CSV_HEADER_ROW);
  return lines.map((l) => (format === 'csv' ? check.csv(l) : check.ndjson(l)));
}

function count<T>(items: readonly T[]): Map<T, number> {
  const m = new Map<T, number>();
  for (const x of items) m.set(x, (m.get(x) ?? 0) + 1);
  return m;
}

const GOOD = new Set<LineKind>(['header', 'sample', 'event', 'marker']);

describe('make-replays', () => {
  it('writes identical bytes on every run, identical to the committed demo files', async () => {
    for (const name of Object.values(DEMO_FILES)) {
      const a = await readFile(join(outA, name));
      const b = await readFile(join(outB, name));
      const committed = await readFile(join(REPLAYS, name));
      expect(a.equals(b), name).toBe(true);
      expect(a.equals(committed), `${name} is stale: run npm run make-replays`).toBe(true);
    }
  });

  it('keeps every demo file under 3 MB', async () => {
    for (const name of Object.values(DEMO_FILES)) expect((await stat(join(REPLAYS, name))).size).toBeLessThan(3_000_000);
  });

  it('writes a walking demo whose lines are records of the format or the intended bad lines', async () => {
    const kinds = kindsOf(await readFile(join(REPLAYS, DEMO_FILES.walkNdjson), 'utf8'), 'ndjson');
    expect(kinds[0]).toBe('header');
    const bad = kinds.filter((k) => !GOOD.has(k));
    expect(bad).toEqual(demoWalkSpec().badLines.map((b) => b.reason));
    const c = count(kinds);
    // 60 s at 100 Hz, two muscles, less the 0.15 s the calf has no samples.
    expect(c.get('sample')).toBe(60 * 100 * 2 - 15);
    expect(c.get('marker')).toBe(2);
    expect(c.get('event')).toBeGreaterThanOrEqual(4 * 53);
  });

  it('writes the same walking trial as CSV, with the bad rows CSV can carry', async () => {
    const ndjson = await readFile(join(REPLAYS, DEMO_FILES.walkNdjson), 'utf8');
    const csvKinds = kindsOf(await readFile(join(REPLAYS, DEMO_FILES.walkCsv), 'utf8'), 'csv');
    const ndjsonKinds = count(kindsOf(ndjson, 'ndjson'));
    const c = count(csvKinds);
    expect(c.get('sample')).toBe(ndjsonKinds.get('sample'));
    expect(c.get('event')).toBe(ndjsonKinds.get('event'));
    expect(csvKinds.filter((k) => !GOOD.has(k))).toEqual(
      demoWalkSpec().badLines.map((b) => b.reason).filter((r) => r !== 'unsafe_key' && r !== 'too_deep'),
    );
  });

  it('gives the walking demo left and right strikes and toe-offs, and a short tracking dropout of the calf', async () => {
    const text = await readFile(join(REPLAYS, DEMO_FILES.walkNdjson), 'utf8');
    const records = text
      .split('\n')
      .filter((l) => l.startsWith('{"t":') && l.length < 1000)
      .flatMap((l) => {
        try {
          return [JSON.parse(l) as Record<string, unknown>];
        } catch {
          return [];
        }
      });
    for (const side of ['left', 'right']) {
      for (const event of ['foot_strike', 'toe_off']) {
        expect(records.filter((r) => r['event'] === event && r['side'] === side).length).toBeGreaterThan(50);
      }
    }
    const calf = records.filter((r) => r['muscle'] === 'calf' && typeof r['quality'] === 'number');
    const lowQuality = calf.filter((r) => (r['quality'] as number) < 0.2).map((r) => r['t'] as number);
    expect(lowQuality.length).toBe(35);
    const times = calf.map((r) => r['t'] as number).filter((t) => t > 20 && t < 25);
    const steps = times.slice(1).map((t, i) => t - (times[i] as number));
    expect(Math.max(...steps)).toBeCloseTo(0.16, 6);
  });

  it('carries a calibration of both muscles in the header, the same as demo-calibration.json and the truth', async () => {
    const text = await readFile(join(REPLAYS, DEMO_FILES.walkNdjson), 'utf8');
    const header = JSON.parse(text.slice(0, text.indexOf('\n'))) as Record<string, unknown>;
    const file = JSON.parse(await readFile(join(REPLAYS, DEMO_FILES.calibration), 'utf8')) as unknown;
    expect(header['calibration']).toEqual(file);
    expect(header['subject']).toBe('SYN-017');
    const parsed = parseCalibration(file);
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    for (const m of demoWalkSpec().muscles) {
      expect(parsed.spec.muscles[m.name]).toEqual({ species: 'human', method: 'sarcomere_count', sarcomeresInSeries: m.sarcomeresInSeries });
    }
  });

  it('writes a running demo of about 20 s at 100 Hz with its intended bad lines', async () => {
    const kinds = kindsOf(await readFile(join(REPLAYS, DEMO_FILES.runNdjson), 'utf8'), 'ndjson');
    expect(kinds.filter((k) => !GOOD.has(k))).toEqual(demoRunSpec().badLines.map((b) => b.reason));
    expect(count(kinds).get('sample')).toBe(20 * 100 * 2);
    const truth = createTrial(demoRunSpec()).truth;
    expect(truth.strides('thigh').length).toBeGreaterThanOrEqual(25);
  });

  it('makes its too-long line longer than the caps of the file reader and of live messages', () => {
    expect(demoWalkSpec().longLineChars).toBeGreaterThan(DEFAULT_MAX_LINE_BYTES);
    expect(demoWalkSpec().longLineChars).toBeGreaterThan(MAX_MESSAGE_CHARS);
  });

  it('is read by the tool\'s file reader and per-muscle ordering with exactly the intended rejections', async () => {
    const cases = [
      { name: DEMO_FILES.walkNdjson, reasons: demoWalkSpec().badLines.map((b) => b.reason) },
      {
        name: DEMO_FILES.walkCsv,
        reasons: demoWalkSpec().badLines.map((b) => b.reason).filter((r) => r !== 'unsafe_key' && r !== 'too_deep'),
      },
      { name: DEMO_FILES.runNdjson, reasons: demoRunSpec().badLines.map((b) => b.reason) },
    ];
    for (const c of cases) {
      const frames = await lastValueFrom(
        fileSource(join(REPLAYS, c.name)).pipe(
          orderPerMuscle(),
          reduce((all: Frame[], batch) => (all.push(...batch), all), []),
        ),
      );
      const rejected = frames.flatMap((f) => (f.kind === 'rejection' ? [f.reason] : []));
      expect(rejected, c.name).toEqual(c.reasons);
    }
  });
});
