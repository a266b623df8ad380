import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseSettings, readSettingsFile } from '../../adapters/settings-file.ts';
import { DEFAULT_SETTINGS, SETTING_EXPLANATIONS, SETTING_KEYS, settingsDocument } from '../../src/trial/settings.ts';

const HEAD = { format: 'lengthwise-settings', version: 1 };

function problemsOf(value: unknown): readonly string[] {
  const result = parseSettings(value);
  if (result.ok) throw new Error('accepted');
  return result.problems;
}

let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-settings-'));
});

describe('settings files', () => {
  it('give every default when they name no setting', () => {
    expect(parseSettings(HEAD)).toEqual({ ok: true, settings: DEFAULT_SETTINGS });
  });

  it('take each setting given and keep the defaults for the rest', () => {
    const result = parseSettings({ ...HEAD, quality_gate: 0.35, gap_s: 0.1 });
    expect(result).toEqual({ ok: true, settings: { ...DEFAULT_SETTINGS, quality_gate: 0.35, gap_s: 0.1 } });
  });

  it('read back what `settingsDocument` writes, the defaults included', () => {
    const changed = { ...DEFAULT_SETTINGS, between_fibre_sd_um: 0.21, stride_flag_gap_fraction: 0.2 };
    expect(parseSettings(JSON.parse(JSON.stringify(settingsDocument(changed))))).toEqual({ ok: true, settings: changed });
  });

  it('explain every setting in one line', () => {
    for (const key of SETTING_KEYS) {
      expect(SETTING_EXPLANATIONS[key].length, key).toBeGreaterThan(20);
      expect(SETTING_EXPLANATIONS[key]).not.toContain('\n');
    }
  });

  it('refuse an unknown key, naming the nearest known one', () => {
    expect(problemsOf({ ...HEAD, quality_gat: 0.3 })[0]).toBe('`quality_gat`: unknown key; did you mean `quality_gate`?');
    expect(problemsOf({ ...HEAD, colour: 'red' })[0]).toMatch(/^`colour`: unknown key; accepted here: format, version, quality_gate, /);
  });

  it('refuse a value out of range with the range accepted', () => {
    expect(problemsOf({ ...HEAD, quality_gate: 1.5 })[0]).toBe('quality_gate: too large; accepted: a tracking quality from 0 to 1');
    expect(problemsOf({ ...HEAD, gap_s: 0 })[0]).toBe('gap_s: too small; accepted: seconds above 0 up to 60');
    expect(problemsOf({ ...HEAD, max_muscles_per_trial: 2.5 })[0]).toContain('must be a whole number');
    expect(problemsOf({ ...HEAD, baseline_s: '3' })[0]).toContain('baseline_s: must be a number');
  });

  it('refuse settings that contradict each other, naming both', () => {
    expect(problemsOf({ ...HEAD, stride_period_min_s: 2, stride_period_max_s: 1 })).toEqual(['stride_period_min_s (2) must be below stride_period_max_s (1)']);
    expect(problemsOf({ ...HEAD, stride_period_max_s: 6 })[0]).toMatch(/^stride_estimate_window_s \(10\) must be at least twice stride_period_max_s \(6\)/);
    expect(problemsOf({ ...HEAD, plausible_sarcomere_min_um: 5, plausible_sarcomere_max_um: 4 })[0]).toContain('plausible_sarcomere_min_um (5) must be below');
  });

  it('refuse another format or version', () => {
    expect(problemsOf({ format: 'lengthwise-mapping', version: 1 })[0]).toBe('format: accepted: "lengthwise-settings"');
    expect(problemsOf({ ...HEAD, version: 2 })[0]).toBe('version: accepted: 1 (the only version so far)');
  });

  it('refuse, as files, text that is not JSON and a key given twice, naming the file', async () => {
    const broken = join(dir, 'broken.json');
    await writeFile(broken, '{"format": "lengthwise-settings",');
    const a = await readSettingsFile(broken);
    expect(a.ok).toBe(false);
    if (!a.ok) expect(a.problems[0]).toContain(`settings file ${broken} is not valid JSON`);
    const twice = join(dir, 'twice.json');
    await writeFile(twice, '{"format": "lengthwise-settings", "version": 1,\n"gap_s": 0.2,\n"gap_s": 0.3}');
    const b = await readSettingsFile(twice);
    expect(b.ok).toBe(false);
    if (!b.ok) expect(b.problems[0]).toBe(`${twice}: \`gap_s\`: given twice (lines 2 and 3); a key may appear once in its object: keep the one you mean`);
    const none = await readSettingsFile(join(dir, 'none.json'));
    expect(none.ok).toBe(false);
    if (!none.ok) expect(none.problems[0]).toContain('cannot read settings file');
  });
});
