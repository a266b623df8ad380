import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runStudy, type StudyEvent } from '../../src/study/run-study.ts';
import { summarizeTrial } from '../../src/study/summarize-trial.ts';
import { trialSectionsHtml } from '../../src/report/report-html.ts';
import { trialFolder, type TrialFolder } from './generated-trials.ts';

let folder: TrialFolder;
const files: string[] = [];
beforeAll(async () => {
  folder = await trialFolder();
  files.push((await folder.trial('a-walk.ndjson', { seed: 21 })).path);
  files.push((await folder.trial('b-run.ndjson', { seed: 22, scenario: 'run' })).path);
  files.push((await folder.trial('c-walk.csv', { seed: 23, format: 'csv' })).path);
  files.push((await folder.trial('d-walk-long.ndjson', { seed: 24, durationS: 40 })).path);
});
afterAll(() => folder.remove());

function workerCount(): number {
  return process.getActiveResourcesInfo().filter((r) => r === 'Worker' || r === 'MessagePort').length;
}

/** The count once workers of earlier tests have finished ending (unchanged over a few looks). */
async function settledWorkerCount(): Promise<number> {
  let count = workerCount();
  for (let same = 0, end = Date.now() + 10_000; same < 4 && Date.now() < end; ) {
    await new Promise((resolve) => setTimeout(resolve, 50));
    const now = workerCount();
    same = now === count ? same + 1 : 0;
    count = now;
  }
  return count;
}

describe('runStudy', () => {
  it('resolves with no outcomes and starts no worker for no files', async () => {
    const events: StudyEvent[] = [];
    expect(await runStudy([], { onEvent: (e) => events.push(e) })).toEqual([]);
    expect(events).toEqual([]);
  });

  it('gives one file the same summary on a worker thread as in this thread', async () => {
    const [outcome] = await runStudy([files[0]!], { jobs: 4 });
    expect(outcome).toEqual(await summarizeTrial(files[0]!));
  });

  it('gives many files their outcomes in the order given, whatever order they finish in', async () => {
    const order: number[] = [];
    const outcomes = await runStudy([files[3]!, ...files.slice(0, 3)], { jobs: 2, onEvent: (e) => e.type === 'trial' && order.push(e.index) });
    expect(outcomes.map((o) => o.path)).toEqual([files[3], ...files.slice(0, 3)]);
    for (const o of outcomes) expect(o).toEqual(await summarizeTrial(o.path));
    expect([...order].sort()).toEqual([0, 1, 2, 3]);
  });

  it('draws each trial\'s report sections on its worker when asked, the same as drawn in this thread', async () => {
    const outcomes = await runStudy([files[0]!, files[1]!], { jobs: 2, drawReport: true });
    for (const [i, o] of outcomes.entries()) {
      if (!o.ok) throw new Error(o.message);
      expect(o.reportWarnings).toEqual([]);
      expect(o.reportSections).toBe(await trialSectionsHtml(o.summary, i + 1));
      expect(o.reportSections).toContain(`id="trial-${i + 1}-calf"`);
    }
    const plain = await runStudy([files[0]!], { jobs: 1 });
    expect(plain[0]).not.toHaveProperty('reportSections');
  });

  it('names a missing and a corrupt file with their reasons and summarizes the rest', async () => {
    const corrupt = await folder.file('corrupt.ndjson', 'this is not a trial\n\u0000\u0001\u0002\n{"t":\n');
    const missing = `${folder.dir}/missing.ndjson`;
    const events: StudyEvent[] = [];
    const outcomes = await runStudy([files[0]!, missing, corrupt, files[1]!], { jobs: 2, onEvent: (e) => events.push(e) });
    expect(outcomes.map((o) => o.ok)).toEqual([true, false, false, true]);
    expect(!outcomes[1]!.ok && outcomes[1]!.message).toMatch(/missing\.ndjson \(no such file\)/);
    expect(!outcomes[2]!.ok && outcomes[2]!.message).toMatch(/corrupt\.ndjson has no valid sample/);
    const last = events.at(-1);
    expect(last?.type).toBe('trial');
    expect(last?.progress).toMatchObject({ trialsTotal: 4, trialsDone: 4, trialsFailed: 2 });
  });

  it('reports progress whose bytes and samples never go back and end at the whole study', async () => {
    const events: StudyEvent[] = [];
    const outcomes = await runStudy(files, { jobs: 2, progressEverySamples: 500, onEvent: (e) => events.push(e) });
    expect(events.some((e) => e.type === 'progress')).toBe(true);
    for (let i = 1; i < events.length; i++) {
      expect(events[i]!.progress.bytesDone).toBeGreaterThanOrEqual(events[i - 1]!.progress.bytesDone);
    }
    const end = events.at(-1)!.progress;
    expect(end.bytesDone).toBe(end.bytesTotal);
    expect(end.samples).toBe(outcomes.reduce((n, o) => n + (o.ok ? o.samples : 0), 0));
  });

  it('stops its workers when aborted and says which trials were not summarized', async () => {
    const before = await settledWorkerCount();
    let during = 0;
    const controller = new AbortController();
    const pending = runStudy([files[3]!, files[3]!, files[3]!], {
      jobs: 2,
      signal: controller.signal,
      progressEverySamples: 100,
      onEvent: (e) => {
        if (e.type !== 'progress') return;
        during = workerCount();
        controller.abort();
      },
    });
    const outcomes = await pending;
    expect(outcomes).toHaveLength(3);
    expect(outcomes.some((o) => !o.ok && /was not summarized: the study was stopped first/.test(o.message))).toBe(true);
    expect(during).toBeGreaterThan(before);
    // Workers end asynchronously once terminated.
    for (const end = Date.now() + 10_000; workerCount() > before && Date.now() < end; ) await new Promise((resolve) => setTimeout(resolve, 20));
    expect(workerCount()).toBeLessThanOrEqual(before);
  });

  it('starts no worker when the signal is already aborted', async () => {
    const outcomes = await runStudy([files[0]!], { signal: AbortSignal.abort() });
    expect(outcomes).toEqual([expect.objectContaining({ ok: false })]);
  });

  it('takes a nonsense job count as one worker', async () => {
    const outcomes = await runStudy([files[0]!, files[1]!], { jobs: Number.NaN });
    expect(outcomes.every((o) => o.ok)).toBe(true);
  });
});
