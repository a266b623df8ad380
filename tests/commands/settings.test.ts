import { mkdtemp, readFile, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runLengthwise } from '../helpers/command-child.ts';
import { parseSettings } from '../../adapters/settings-file.ts';
import { DEFAULT_SETTINGS, SETTING_KEYS } from '../../src/trial/settings.ts';

const DEMO = join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.ndjson');

let dir = '';
let mistyped = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-settings-command-'));
  mistyped = join(dir, 'mistyped.json');
  await writeFile(mistyped, JSON.stringify({ format: 'lengthwise-settings', version: 1, gap_sec: 0.3 }));
});

describe('lengthwise settings', () => {
  it('prints every default as a settings file that reads back to the defaults', async () => {
    const ran = await runLengthwise(['settings']);
    expect(ran.code).toBe(0);
    expect(parseSettings(JSON.parse(ran.stdout))).toEqual({ ok: true, settings: DEFAULT_SETTINGS });
    expect(Object.keys(JSON.parse(ran.stdout) as object)).toEqual(['format', 'version', ...SETTING_KEYS]);
  });

  it('says what each setting does with --explain, a line each with its value', async () => {
    const ran = await runLengthwise(['settings', '--explain']);
    expect(ran.code).toBe(0);
    const lines = ran.stdout.trimEnd().split('\n');
    expect(lines).toHaveLength(SETTING_KEYS.length);
    expect(lines[0]).toMatch(/^quality_gate +0\.2 +tracking quality/);
  });

  it('prints the settings a file gives, the defaults filling in the rest', async () => {
    const path = join(dir, 'gate.json');
    await writeFile(path, JSON.stringify({ format: 'lengthwise-settings', version: 1, quality_gate: 0.4 }));
    const ran = await runLengthwise(['settings', '--settings', path]);
    expect(ran.code).toBe(0);
    expect(JSON.parse(ran.stdout)).toMatchObject({ quality_gate: 0.4, gap_s: DEFAULT_SETTINGS.gap_s });
  });

  it('is refused by every command, before any work, when a key is not known, with the nearest one', async () => {
    const runs = await Promise.all([
      runLengthwise(['settings', '--settings', mistyped]),
      runLengthwise(['replay', DEMO, '--speed', 'max', '--settings', mistyped]),
      runLengthwise(['summarize', DEMO, '--settings', mistyped]),
      runLengthwise(['inspect', DEMO, '--settings', mistyped]),
      runLengthwise(['calibrate', DEMO, '--muscle', 'calf', '--window', '0-2', '--sarcomere-length', '2.7', '--settings', mistyped]),
      runLengthwise(['curve', '--sl', '2.5', '--settings', mistyped]),
      runLengthwise(['live', '--listen', '0', '--duration', '1', '--settings', mistyped]),
      runLengthwise(['simulate', '--listen', '0', '--duration', '1', '--settings', mistyped]),
    ]);
    for (const ran of runs) {
      expect(ran.code).toBe(2);
      expect(ran.stderr).toContain('the settings file was not accepted');
      expect(ran.stderr).toContain('`gap_sec`: unknown key; did you mean `gap_s`?');
    }
  });
});

describe('a settings file given to replay', () => {
  it('changes what the pipeline does: a narrower plausible range is said in the summary', async () => {
    const narrow = join(dir, 'narrow.json');
    await writeFile(narrow, JSON.stringify({ format: 'lengthwise-settings', version: 1, plausible_sarcomere_max_um: 2 }));
    const [plain, settled] = [join(dir, 'plain.json'), join(dir, 'narrow-summary.json')];
    const ran = await Promise.all([
      runLengthwise(['replay', DEMO, '--speed', 'max', '--summary', plain]),
      runLengthwise(['replay', DEMO, '--speed', 'max', '--summary', settled, '--settings', narrow]),
    ]);
    expect(ran.map((r) => r.code)).toEqual([0, 0]);
    const [a, b] = await Promise.all([plain, settled].map(async (p) => JSON.parse(await readFile(p, 'utf8')) as { warnings: string[] }));
    expect(a?.warnings.some((w) => w.includes('outside 1–5 µm'))).toBe(false);
    expect(b?.warnings.some((w) => w.includes('outside 1–2 µm'))).toBe(true);
  });

  it('flags every stride with any gap time when the stride flag threshold is 0', async () => {
    const strict = join(dir, 'strict.json');
    await writeFile(strict, JSON.stringify({ format: 'lengthwise-settings', version: 1, stride_flag_gap_fraction: 0, quality_gate: 0.9 }));
    const out = join(dir, 'strict-summary.json');
    const ran = await runLengthwise(['replay', DEMO, '--speed', 'max', '--summary', out, '--settings', strict]);
    expect(ran.code).toBe(0);
    const summary = JSON.parse(await readFile(out, 'utf8')) as { muscles: Record<string, { strides: { gap_s: number; flagged: boolean }[] }> };
    const strides = Object.values(summary.muscles).flatMap((m) => m.strides);
    expect(strides.some((s) => s.gap_s > 0)).toBe(true);
    for (const s of strides) expect(s.flagged).toBe(s.gap_s > 0);
  });
});
