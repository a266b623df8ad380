import { describe, expect, it } from 'vitest';
import { mkdtemp, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runLengthwise } from '../helpers/command-child.ts';

const DEMO = join(import.meta.dirname, '..', '..', 'replays', 'demo-walk.csv');

describe('a trial where only some muscles are calibrated', () => {
  it('names the muscles left on the assumed baseline in the closing report', async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-partial-'));
    const cal = join(dir, 'calf-only.json');
    await writeFile(cal, JSON.stringify({ muscles: { calf: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: 17500 } } }));
    const ran = await runLengthwise(['replay', DEMO, '--speed', 'max', '--calibration', cal]);
    expect(ran.code).toBe(0);
    expect(ran.stdout).toMatch(/^UNCALIBRATED \(thigh\): /m);
  });
});
