/**
 * Every output says what made it: the summary JSON its "provenance", the stride table a sidecar with the
 * same, each input file with its size and SHA-256 (checked here against the system's own sha256sum,
 * GNU coreutils, not the tool's hashing).
 */
import { execFileSync } from 'node:child_process';
import { mkdtemp, readFile, stat, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runLengthwise } from '../helpers/command-child.ts';
import { DEFAULT_SETTINGS, SETTING_KEYS } from '../../src/trial/settings.ts';
import type { SummaryJson } from '../../src/output/summary-json.ts';
import type { RunProvenanceJson } from '../../src/output/run-provenance.ts';

const REPLAYS = join(import.meta.dirname, '..', '..', 'replays');
const DEMO = join(REPLAYS, 'demo-walk.ndjson');
const DEMO_CAL = join(REPLAYS, 'demo-calibration.json');

function sha256sum(path: string): string {
  return execFileSync('sha256sum', [path], { encoding: 'utf8' }).split(' ')[0] as string;
}

let dir = '';
let settingsPath = '';
let summary: SummaryJson;
let sidecar: RunProvenanceJson;
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-provenance-'));
  settingsPath = join(dir, 'settings.json');
  await writeFile(settingsPath, JSON.stringify({ format: 'lengthwise-settings', version: 1, gap_s: 0.3 }));
  const out = join(dir, 'summary.json');
  const strides = join(dir, 'strides.csv');
  const ran = await runLengthwise(['replay', DEMO, '--speed', 'max', '--calibration', DEMO_CAL, '--settings', settingsPath, '--summary', out, '--strides', strides]);
  expect(ran.code, ran.stderr).toBe(0);
  summary = JSON.parse(await readFile(out, 'utf8')) as SummaryJson;
  sidecar = JSON.parse(await readFile(`${strides}.provenance.json`, 'utf8')) as RunProvenanceJson;
});

describe('the provenance of a replay', () => {
  it('names the tool, its version and when the outputs were made', async () => {
    const p = summary.provenance as RunProvenanceJson;
    const pkg = JSON.parse(await readFile(join(import.meta.dirname, '..', '..', 'package.json'), 'utf8')) as { version: string };
    expect(p.tool).toBe('lengthwise');
    expect(p.version).toBe(pkg.version);
    expect(Date.now() - Date.parse(p.created_utc)).toBeLessThan(10 * 60 * 1000);
    expect(p.created_utc).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/);
  });

  it('holds every setting in effect, the defaults included', () => {
    const settings = (summary.provenance as RunProvenanceJson).settings;
    expect(Object.keys(settings)).toEqual(['format', 'version', ...SETTING_KEYS]);
    expect(settings).toMatchObject({ ...DEFAULT_SETTINGS, gap_s: 0.3 });
  });

  it('lists each input file with its size and SHA-256', async () => {
    const inputs = (summary.provenance as RunProvenanceJson).inputs;
    expect(inputs.map((i) => [i.kind, i.path])).toEqual([
      ['trial', DEMO],
      ['calibration', DEMO_CAL],
      ['settings', settingsPath],
    ]);
    for (const input of inputs) {
      expect(input.bytes).toBe((await stat(input.path)).size);
      expect(input.sha256).toBe(sha256sum(input.path));
    }
  });

  it('says the calibration each muscle ran on and where it came from', () => {
    expect((summary.provenance as RunProvenanceJson).calibration).toEqual([
      { muscle: 'calf', source: 'file', method: 'sarcomere count', sarcomeres_in_series: 17500, file: DEMO_CAL, provenance: null },
      { muscle: 'thigh', source: 'file', method: 'sarcomere count', sarcomeres_in_series: 30000, file: DEMO_CAL, provenance: null },
    ]);
  });

  it('is the same beside the stride table as in the summary', () => {
    expect(sidecar).toEqual(summary.provenance);
  });
});

describe('markers', () => {
  it('are listed in the summary with their time and text, in order', () => {
    expect(summary.frames.markers).toBeGreaterThan(0);
    expect(summary.markers.length).toBe(summary.frames.markers);
    expect(summary.markers[0]).toEqual({ t_s: 0, text: 'belt 1.3 m/s' });
    for (let i = 1; i < summary.markers.length; i++) expect(summary.markers[i]!.t_s).toBeGreaterThanOrEqual(summary.markers[i - 1]!.t_s);
  });
});
