import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { MAX_MUSCLES_PER_TRIAL } from '../../src/trial/settings.ts';
import { runLengthwise as lengthwise } from '../helpers/command-child.ts';
import { trialLines } from '../helpers/trial-lines.ts';

const DEMO = join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.ndjson');

let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-names-'));
});

describe('muscle names that are names of object properties', () => {
  /** The demo walk with its muscles renamed; the header no longer declares them (a header may not hold such keys). */
  async function renamedDemo(names: Record<string, string>): Promise<string> {
    const lines: string[] = [];
    for (const { text, record } of await trialLines(DEMO)) {
      if (record === null) {
        lines.push(text);
        continue;
      }
      if (record['format'] === 'lengthwise-stream') {
        delete record['muscles'];
        delete record['calibration'];
      }
      const muscle = record['muscle'];
      if (typeof muscle === 'string' && Object.hasOwn(names, muscle)) record['muscle'] = names[muscle];
      lines.push(JSON.stringify(record));
    }
    const path = join(dir, 'renamed.ndjson');
    await writeFile(path, lines.join('\n'));
    return path;
  }

  it('keeps __proto__ and constructor as muscles like any other: in the summary, the stride table, the study table, and with their calibration', async () => {
    const trial = await renamedDemo({ calf: '__proto__', thigh: 'constructor' });
    const calibration = join(dir, 'cal.json');
    await writeFile(
      calibration,
      '{"muscles": {"__proto__": {"species": "human", "method": "sarcomere_count", "sarcomeres_in_series": 17500},' +
        ' "constructor": {"species": "human", "method": "sarcomere_count", "sarcomeres_in_series": 30000}}}',
    );
    const summaryPath = join(dir, 'summary.json');
    const stridesPath = join(dir, 'strides.csv');
    const ran = await lengthwise(['replay', trial, '--speed', 'max', '--plain', '--calibration', calibration, '--summary', summaryPath, '--strides', stridesPath]);
    expect(ran.code, ran.stderr).toBe(0);
    const summary = JSON.parse(await readFile(summaryPath, 'utf8'));
    expect(Object.keys(summary.muscles).sort()).toEqual(['__proto__', 'constructor']);
    expect(summary.calibrated).toBe(true);
    const proto = Object.getOwnPropertyDescriptor(summary.muscles, '__proto__')?.value;
    expect(proto).toMatchObject({ calibration_source: 'file', sarcomeres_in_series: 17500 });
    expect(summary.muscles.constructor).toMatchObject({ calibration_source: 'file', sarcomeres_in_series: 30000 });
    expect(proto.trial.stride_count).toBeGreaterThan(40);
    const rows = (await readFile(stridesPath, 'utf8')).split('\r\n').slice(1).filter((r) => r !== '');
    expect(rows.filter((r) => r.startsWith('__proto__,')).length).toBe(proto.strides.length);
    expect(rows.filter((r) => r.startsWith('constructor,')).length).toBe(summary.muscles.constructor.strides.length);

    const study = await lengthwise(['summarize', trial, '--calibration', calibration, '--plain', '--jobs', '1']);
    expect(study.code, study.stderr).toBe(0);
    const table = study.stdout.trim().split(/\r?\n/);
    const muscleColumn = (table[0] as string).split(',').indexOf('muscle');
    expect(table.slice(1).map((row) => row.split(',')[muscleColumn]).sort()).toEqual(['__proto__', 'constructor']);
  });
});

describe('a trial that makes up a new muscle name for every sample', () => {
  it(`takes its first ${MAX_MUSCLES_PER_TRIAL} muscles and counts every further one's samples as too_many_muscles`, async () => {
    const path = join(dir, 'names.ndjson');
    const lines: string[] = [];
    for (let i = 0; i < 10_000; i++) lines.push(JSON.stringify({ t: i / 100, muscle: `m${i}`, fascicle_mm: 50 }));
    // Later samples of a muscle taken are still taken.
    lines.push(JSON.stringify({ t: 100, muscle: 'm0', fascicle_mm: 51 }));
    await writeFile(path, lines.join('\n'));
    const summaryPath = join(dir, 'names.json');
    const ran = await lengthwise(['replay', path, '--speed', 'max', '--plain', '--summary', summaryPath]);
    expect(ran.code, ran.stderr).toBe(0);
    const summary = JSON.parse(await readFile(summaryPath, 'utf8'));
    expect(Object.keys(summary.muscles)).toHaveLength(MAX_MUSCLES_PER_TRIAL);
    expect(summary.frames).toMatchObject({ accepted: MAX_MUSCLES_PER_TRIAL + 1, rejected: 10_000 - MAX_MUSCLES_PER_TRIAL, rejected_by_reason: { too_many_muscles: 10_000 - MAX_MUSCLES_PER_TRIAL } });
    expect(ran.stdout).toContain('too_many_muscles');
  });
});
