import { describe, expect, it } from 'vitest';
import { mkdtemp, readdir, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Subject } from 'rxjs';
import { applyCapture } from '../../src/run/apply-capture.ts';
import { runTrial } from '../../src/run/run-trial.ts';
import { readCalibrationFile } from '../../adapters/calibration-file.ts';
import type { Batch } from '../../src/trial/records.ts';
import { header, sample } from '../helpers/frames.ts';

const calibration = { muscles: { calf: { species: 'human' as const, method: 'sarcomere_count' as const, sarcomeresInSeries: 20000 } } };

describe('applyCapture', () => {
  it('applies the captured calibration from now on and saves a file the calibration reader accepts', async () => {
    const folder = await mkdtemp(join(tmpdir(), 'lengthwise-capture-'));
    const input = new Subject<Batch>();
    const trial = runTrial(input, { source: 'mem', calibration });
    const standing: Batch = [header({ muscles: { calf: { side: 'left' } } })];
    for (let i = 0; i < 400; i++) standing.push(sample(i / 100, 'calf', 54));
    input.next(standing);
    const said = await applyCapture(trial, 'calf', 2.7, folder);
    expect(said).toContain('calf: calibrated at 2.7 µm from 54.0 mm');
    input.next([sample(4.01, 'calf', 54)]);
    input.complete();
    const state = await trial.done;
    expect(state.muscles.get('calf')?.calibrationSource).toBe('runtime');
    expect(state.muscles.get('calf')?.latest?.sarcomereUm).toBeCloseTo(2.7, 2);
    const [file] = await readdir(folder);
    const saved = await readCalibrationFile(join(folder, file ?? ''));
    expect(saved.ok).toBe(true);
    expect(JSON.parse(await readFile(join(folder, file ?? ''), 'utf8'))).toMatchObject({ muscles: { calf: { method: 'reference', reference_sarcomere_um: 2.7 } } });
  });

  it('says why nothing was applied when the muscle has too few recent samples', async () => {
    const trial = runTrial(new Subject<Batch>(), { source: 'mem' });
    expect(await applyCapture(trial, 'calf', 2.7, tmpdir())).toContain('hold the posture');
    trial.stop();
  });
});
