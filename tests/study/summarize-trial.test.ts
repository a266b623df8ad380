import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { fileSource } from '../../adapters/file-source.ts';
import { runTrial } from '../../src/run/run-trial.ts';
import { summaryJson } from '../../src/output/summary-json.ts';
import { summarizeTrial, type TrialProgress } from '../../src/study/summarize-trial.ts';
import { statSync } from 'node:fs';
import { trialFolder, type TrialFolder } from './generated-trials.ts';

let folder: TrialFolder;
beforeAll(async () => {
  folder = await trialFolder();
});
afterAll(() => folder.remove());

describe('summarizeTrial', () => {
  it('gives exactly the summary JSON that --summary writes for the same file', async () => {
    const { path } = await folder.trial('same.ndjson', { seed: 11 });
    const outcome = await summarizeTrial(path);
    const direct = summaryJson(await runTrial(fileSource(path), { source: path }).done);
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    expect(outcome.summary).toEqual(direct);
    expect(outcome.samples).toBe(direct.frames.accepted);
    expect(outcome.bytes).toBe(statSync(path).size);
  });

  it('reads the CSV variant too', async () => {
    const { path } = await folder.trial('one.csv', { seed: 12, format: 'csv' });
    const outcome = await summarizeTrial(path);
    expect(outcome.ok && Object.keys(outcome.summary.muscles).sort()).toEqual(['calf', 'thigh']);
  });

  it('finds as many strides as the generator put in', async () => {
    const { path, trial } = await folder.trial('strides.ndjson', { seed: 13, durationS: 10 });
    const outcome = await summarizeTrial(path);
    if (!outcome.ok) throw new Error(outcome.message);
    for (const muscle of ['calf', 'thigh']) {
      expect(outcome.summary.muscles[muscle]?.trial.stride_count).toBe(trial.truth.strides(muscle).length);
    }
  });

  it('reports progress that never goes back, never passes the file size, and ends at the samples read', async () => {
    const { path } = await folder.trial('progress.ndjson', { seed: 14, durationS: 30 });
    const seen: TrialProgress[] = [];
    const outcome = await summarizeTrial(path, { onProgress: (p) => seen.push(p) });
    if (!outcome.ok) throw new Error(outcome.message);
    expect(seen.length).toBeGreaterThan(1);
    for (let i = 1; i < seen.length; i++) {
      expect(seen[i]!.bytesRead).toBeGreaterThanOrEqual(seen[i - 1]!.bytesRead);
      expect(seen[i]!.samples).toBeGreaterThanOrEqual(seen[i - 1]!.samples);
    }
    expect(seen.at(-1)!.bytesRead).toBeLessThanOrEqual(outcome.bytes);
    // Every sample line counts, also those the pipeline later rejects (ordering, duplicates).
    expect(seen.at(-1)!.samples).toBeGreaterThanOrEqual(outcome.samples);
  });

  it('applies a calibration given for every trial, over the header', async () => {
    const { path } = await folder.trial('calibrated.ndjson', { seed: 15 });
    const calibration = { muscles: { calf: { species: 'human' as const, method: 'sarcomere_count' as const, sarcomeresInSeries: 20_000 } } };
    const outcome = await summarizeTrial(path, { calibration });
    if (!outcome.ok) throw new Error(outcome.message);
    expect(outcome.summary.muscles.calf?.calibration_source).toBe('file');
    expect(outcome.summary.muscles.calf?.sarcomeres_in_series).toBe(20_000);
  });

  it('names a missing file and says what to check', async () => {
    const outcome = await summarizeTrial(`${folder.dir}/nowhere.ndjson`);
    expect(outcome).toMatchObject({ ok: false, bytes: 0 });
    expect(!outcome.ok && outcome.message).toMatch(/cannot read .*nowhere\.ndjson \(no such file\); check the path/);
  });

  it('says a folder is not a trial file', async () => {
    const outcome = await summarizeTrial(folder.dir);
    expect(!outcome.ok && outcome.message).toMatch(/is not a file/);
  });

  it('fails an empty file, saying it is empty', async () => {
    const outcome = await summarizeTrial(await folder.file('empty.ndjson', ''));
    expect(!outcome.ok && outcome.message).toMatch(/is empty: no records/);
  });

  it('fails a corrupt file with no valid sample, listing what was rejected and what is accepted', async () => {
    const path = await folder.file('corrupt.ndjson', Buffer.from([0x7b, 0x22, 0x74, 0x0a, 0xff, 0xfe, 0x00, 0x0a, 0x5b, 0x31, 0x0a]));
    const outcome = await summarizeTrial(path);
    expect(!outcome.ok && outcome.message).toMatch(/has no valid sample in 3 lines \(rejected: \d+ not_json .*\); check that it is a lengthwise-stream trial/);
  });

  it('fails a CSV whose header row lacks a required column, with the reader\'s reason', async () => {
    const path = await folder.file('bad-header.csv', 'time_s,muscle\n0,calf\n');
    const outcome = await summarizeTrial(path);
    expect(outcome.ok).toBe(false);
    expect(!outcome.ok && outcome.message).toContain('bad-header.csv line 1');
  });
});
