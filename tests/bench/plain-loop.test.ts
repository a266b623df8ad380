import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { benchSarcomeres, writeBenchTrial, type BenchTrial } from '../../bench/generate.ts';
import { plainLoop } from '../../bench/plain-loop.ts';
import { runToolReplay } from '../../bench/tool-replay.ts';
import { figureDifferences, figuresFromSummary } from '../../bench/figures.ts';

// Invented trials from the repo's generator (src/sim/); the check is that the yardstick does the same work.
let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-bench-test-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

async function compare(trial: BenchTrial): Promise<string[]> {
  const tool = figuresFromSummary((await runToolReplay(trial.path, trial.calibration)).summary);
  const loop = await plainLoop(trial.path, { format: trial.format, sarcomeresInSeries: benchSarcomeres(trial.spec) });
  expect(tool.accepted).toBeGreaterThan(0);
  return figureDifferences(tool, loop);
}

describe('the plain loop of the benchmark', () => {
  for (const format of ['csv', 'ndjson'] as const) {
    it(`gives the tool's counts, strides and trial means for a ${format} trial with bad lines and dropouts`, async () => {
      const trial = await writeBenchTrial(dir, format, { samples: 20_000, seed: 3 });
      expect(await compare(trial)).toEqual([]);
    });

    it(`gives the tool's figures for four muscles of a clean ${format} trial`, async () => {
      const trial = await writeBenchTrial(dir, format, { samples: 12_000, muscles: 4, seed: 5, faults: false });
      expect(await compare(trial)).toEqual([]);
    });
  }

  it('counts each stride and flags the one with a dropout, like the tool', async () => {
    const trial = await writeBenchTrial(dir, 'ndjson', { samples: 20_000, seed: 3 });
    const loop = await plainLoop(trial.path, { format: 'ndjson', sarcomeresInSeries: benchSarcomeres(trial.spec) });
    const calf = loop.muscles['calf'];
    expect(calf?.strides).toBeGreaterThan(80);
    expect(calf?.flagged).toBeGreaterThanOrEqual(1);
    expect(loop.rejected).toBeGreaterThanOrEqual(4);
  });
});

describe('figureDifferences', () => {
  const base = { received: 3, accepted: 2, rejected: 1, lowQuality: 0, muscles: { calf: { strides: 1, flagged: 0, slMeanUm: 2.5, forceMean: 0.9, plateauFraction: 0.4 } } };

  it('finds none between equal figures, and names a differing mean', () => {
    expect(figureDifferences(base, base)).toEqual([]);
    const other = { ...base, muscles: { calf: { ...base.muscles.calf, slMeanUm: 2.6 } } };
    expect(figureDifferences(base, other)).toEqual(['calf slMeanUm: 2.5 vs 2.6']);
    // The tool writes a mean length to 4 decimals: half of the last one is no difference.
    const written = { ...base, muscles: { calf: { ...base.muscles.calf, slMeanUm: 2.50004 } } };
    expect(figureDifferences(base, written)).toEqual([]);
  });

  it('names a muscle present in only one', () => {
    expect(figureDifferences(base, { ...base, muscles: {} })).toEqual(['calf: present in only one']);
  });
});
