import { execFile } from 'node:child_process';
import { mkdtemp, readFile, stat, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { stringify } from 'csv-stringify/sync';
import { beforeAll, describe, expect, it } from 'vitest';
import type { SummaryJson } from '../../src/output/summary-json.ts';
import { studyCsv } from '../../src/study/study-csv.ts';
import { runLengthwise } from '../helpers/command-child.ts';
import { THIGH_CLOCK_AHEAD_S, twoProbeTrial, type TwoProbeTrial } from '../helpers/two-probe-trial.ts';

let dir = '';
let t: TwoProbeTrial;
let unsplit: SummaryJson;

async function replayed(args: readonly string[], name: string): Promise<SummaryJson> {
  const summaryPath = join(dir, `${name}.summary.json`);
  const ran = await runLengthwise(['replay', ...args, '--speed', 'max', '--plain', '--summary', summaryPath]);
  expect(ran.stderr).not.toMatch(/\n\s+at /);
  expect(ran.code, ran.stderr).toBe(0);
  return JSON.parse(await readFile(summaryPath, 'utf8')) as SummaryJson;
}

beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-description-'));
  t = await twoProbeTrial(dir);
  unsplit = await replayed([t.both, '--mapping', t.bothMapping, '--events', t.events, '--calibration', t.calibration], 'unsplit');
}, 60_000);

describe('a trial recorded by two probes, each on its own clock, described in one file', () => {
  it('gives the strides and figures of the same trial recorded in one table, every muscle on its declared side', async () => {
    const described = await replayed([t.description], 'described');
    expect(Object.keys(described.muscles)).toEqual(['calf', 'thigh']);
    for (const [name, m] of Object.entries(unsplit.muscles)) {
      const d = described.muscles[name];
      expect(d?.strides.length, name).toBeGreaterThan(30);
      expect(d?.side, name).toBe(m.side);
      expect(d?.side_source, name).toBe('declared');
      expect(d?.calibration_source, name).toBe('file');
      // The same strides, figure for figure: every number written, to the precision it is written with.
      expect(d?.strides, name).toEqual(m.strides);
      expect(d?.trial, name).toEqual(m.trial);
      expect(d?.cycle, name).toEqual(m.cycle);
    }
    expect(described.frames.accepted).toBe(unsplit.frames.accepted);
    expect(described.frames.gait_events).toBe(unsplit.frames.gait_events);
    expect([described.subject, described.trial]).toEqual(['SYN-031', 'walk-2probe']);
    expect(described.warnings).toEqual([]);
  });

  it('lists every file the trial read, with what it is, its size and its SHA-256 as sha256sum gives it, in the provenance', async () => {
    const described = await replayed([t.description], 'sources');
    const files = [t.description, t.calf, t.calfMapping, t.thigh, t.thighMapping, t.events, t.eventsMapping, t.calibration];
    const inputs = described.provenance?.inputs ?? [];
    expect(inputs.map((s) => s.path)).toEqual(files);
    expect(inputs.map((s) => s.kind)).toEqual(['description', 'recording', 'mapping', 'recording', 'mapping', 'events', 'mapping', 'calibration']);
    // The reference: coreutils' sha256sum (FIPS 180-4 SHA-256), a program outside the project.
    const { stdout } = await promisify(execFile)('sha256sum', files);
    const reference = new Map(stdout.trim().split('\n').map((line) => [line.slice(66), line.slice(0, 64)]));
    for (const s of inputs) {
      expect(s.sha256, s.path).toBe(reference.get(s.path));
      expect(s.bytes, s.path).toBe((await stat(s.path)).size);
    }
    expect(unsplit.provenance?.inputs.map((s) => s.kind)).toEqual(['trial', 'events', 'mapping', 'calibration']);
  });

  it('refuses a recording whose clock does not overlap the others\', and suggests the offset that lines it up', async () => {
    const noOffset = await t.describe('no-offset.json', { ...t.content, recordings: [t.content.recordings[0], { file: 'thigh.csv', mapping: 'thigh-map.json' }] });
    const slipped = await t.describe('slipped.json', { ...t.content, recordings: [t.content.recordings[0], { file: 'thigh.csv', mapping: 'thigh-map.json', time_offset_s: -41.235 }] });
    for (const [path, given] of [
      [noOffset, 'it gives none'],
      [slipped, 'it gives -41.235'],
    ] as const) {
      const ran = await runLengthwise(['replay', path, '--speed', 'max', '--plain']);
      expect(ran.code).toBe(1);
      expect(ran.stderr).toContain(`lengthwise replay: ${t.thigh} spans `);
      expect(ran.stderr).toContain(`the other recordings 0–39.99 s: they overlap by nothing, less than one stride (1.101 s, the median time between foot strikes of one side at the start of ${t.events})`);
      expect(ran.stderr).toContain(`Lining its first sample up with the first sample of ${t.calf} gives "time_offset_s": ${-THIGH_CLOCK_AHEAD_S} in its entry of the description (${given};`);
    }
  });

  it('refuses a muscle in two recordings, naming both files, before anything plays', async () => {
    const twice = await t.describe('twice.json', { ...t.content, recordings: [...t.content.recordings, { file: 'both.csv' }] });
    const ran = await runLengthwise(['replay', twice, '--speed', 'max', '--plain']);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toContain(`lengthwise replay: muscle "calf" is in two recordings, ${t.calf} and ${t.both}: a muscle may come from one recording only`);
  });

  it('stops a trial at a muscle that turns up late in a second recording, naming both files and the line', async () => {
    const rows = [['time_s', 'muscle', 'fascicle_mm']];
    for (let i = 0; i < 3000; i++) rows.push([String(i / 100), 'shin', '60']);
    rows.push(['30', 'calf', '50']);
    await writeFile(join(dir, 'late.csv'), stringify(rows));
    const late = await t.describe('late.json', { ...t.content, recordings: [t.content.recordings[0], { file: 'late.csv' }] });
    const ran = await runLengthwise(['replay', late, '--speed', 'max', '--plain']);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toContain(`${join(dir, 'late.csv')} line 3002: muscle "calf" is in two recordings, ${t.calf} and ${join(dir, 'late.csv')}`);
  });

  it('names the recording of every rejection, with its line', async () => {
    await writeFile(join(dir, 'bad-a.csv'), stringify([['time_s', 'muscle', 'fascicle_mm'], ['0', 'calf', '-3'], ['0.01', 'calf', 'lost']]));
    await writeFile(join(dir, 'bad-b.csv'), stringify([['time_s', 'muscle', 'fascicle_mm'], ['0', 'thigh', '0']]));
    const bad = await t.describe('bad.json', { format: 'lengthwise-trial', version: 1, recordings: [{ file: 'bad-a.csv' }, { file: 'bad-b.csv' }] });
    const ran = await runLengthwise(['replay', bad, '--speed', 'max', '--plain']);
    expect(ran.code).toBe(1);
    expect(ran.stderr).toContain(`lengthwise replay: ${bad} has no valid sample`);
    expect(ran.stderr).toContain(`  ${join(dir, 'bad-a.csv')} line 2 (fascicle_mm): fascicle_mm is -3`);
    expect(ran.stderr).toContain(`  ${join(dir, 'bad-a.csv')} line 3 (fascicle_mm): fascicle_mm is "lost"`);
    expect(ran.stderr).toContain(`  ${join(dir, 'bad-b.csv')} line 2 (fascicle_mm): fascicle_mm is 0`);
  });

  it('lets the command line win over the description, with a note in the summary', async () => {
    const other = join(dir, 'other-cal.json');
    await writeFile(other, JSON.stringify({ muscles: { calf: { method: 'sarcomere_count', sarcomeres_in_series: 16_000 } } }));
    const s = await replayed([t.description, '--calibration', other, '--side', 'calf=right'], 'overridden');
    expect(s.muscles['calf']?.sarcomeres_in_series).toBe(16_000);
    expect(s.muscles['calf']?.side).toBe('right');
    expect(s.warnings).toContain(`--calibration wins over the description's calibration (${t.calibration})`);
    expect(s.warnings).toContain(`--side calf=right wins over ${t.calfMapping}, which gives left`);
    expect(s.provenance?.inputs.map((x) => x.path)).not.toContain(t.calibration);
  });

  it('says what is wrong with a description it does not accept, with the nearest key', async () => {
    const typo = await t.describe('typo.json', { ...t.content, recordings: undefined, recording: t.content.recordings });
    const ran = await runLengthwise(['replay', typo, '--speed', 'max', '--plain']);
    expect(ran.code).toBe(2);
    expect(ran.stderr).toContain('lengthwise replay: the trial description was not accepted:');
    expect(ran.stderr).toContain(`${typo}: \`recording\`: unknown key; did you mean \`recordings\`?`);
  });

  it('gives summarize the same row as replay', async () => {
    const out = join(dir, 'study.csv');
    const ran = await runLengthwise(['summarize', t.description, '--out', out, '--plain', '--jobs', '1']);
    expect(ran.code, ran.stderr).toBe(0);
    const described = await replayed([t.description], 'for-study');
    expect(await readFile(out, 'utf8')).toBe(studyCsv([described]));
  });

  it('calibrates from a description\'s recordings', async () => {
    const ran = await runLengthwise(['calibrate', t.description, '--muscle', 'thigh', '--window', '1-4', '--sarcomere-length', '2.9']);
    expect(ran.code, ran.stderr).toBe(0);
    expect(JSON.parse(ran.stdout)).toMatchObject({ muscles: { thigh: { method: 'sarcomere_count' } } });
  });
});

describe('lengthwise inspect DESCRIPTION', () => {
  it('shows each recording with its muscles and its span on the trial\'s clock, the events file and the overlap', async () => {
    const ran = await runLengthwise(['inspect', t.description]);
    expect(ran.code, ran.stderr).toBe(0);
    const text = ran.stdout;
    expect(text).toContain(`${t.description}: a trial description of 2 recordings; can be read`);
    expect(text).toContain(`  recording 1: ${t.calf} (mapping ${t.calfMapping}, time offset 0 s): can be read`);
    expect(text).toContain(`  recording 2: ${t.thigh} (mapping ${t.thighMapping}, time offset ${-THIGH_CLOCK_AHEAD_S} s): can be read`);
    expect(text).toMatch(/ {4}muscle calf: left \(from the mapping\); 4000 samples, 0–39\.99 s at 100 Hz/);
    expect(text).toMatch(/ {4}muscle thigh: right \(from the mapping\); 4000 samples, 0–39\.99 s at 100 Hz/);
    expect(text).toContain("    span on the trial's clock: 0–39.99 s");
    expect(text).toContain('  overlap of the recordings: 0–39.99 s (39.99 s)');
    expect(text).toContain(`  events file ${t.events}: can be read; 145 lines: 0 samples, 144 gait events`);
  });

  it('says, as JSON, each recording\'s span and the overlap, and exits 1 when a clock is off', async () => {
    const noOffset = await t.describe('inspect-no-offset.json', { ...t.content, recordings: [t.content.recordings[0], { file: 'thigh.csv', mapping: 'thigh-map.json' }] });
    const ran = await runLengthwise(['inspect', noOffset, '--json']);
    expect(ran.code).toBe(1);
    const i = JSON.parse(ran.stdout) as { readable: boolean; problem: string; overlap: unknown; recordings: { file: string; time_offset_s: number; first_s: number; last_s: number; muscles: object }[] };
    expect(i.readable).toBe(false);
    expect(i.overlap).toBeNull();
    expect(i.recordings.map((r) => [r.file, r.time_offset_s, Object.keys(r.muscles)])).toEqual([
      [t.calf, 0, ['calf']],
      [t.thigh, 0, ['thigh']],
    ]);
    expect(i.recordings[1]?.first_s).toBeCloseTo(THIGH_CLOCK_AHEAD_S, 9);
    expect(i.problem).toContain('"time_offset_s": -412.35');
  });
});
