import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Subject } from 'rxjs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { estimateStrides } from '../../src/pipeline/estimate-strides.ts';
import { DEFAULT_GRID_S, dominantPeriod } from '../../src/model/stride-period.ts';
import { header, runBatches, runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Batch, Frame, Sample, StrideBoundary } from '../../src/trial/records.ts';
import { fileSource } from '../../adapters/file-source.ts';
import { runTrial } from '../../src/run/run-trial.ts';
import { summaryJson, type SummaryJson } from '../../src/output/summary-json.ts';
import { createTrial } from '../../src/sim/gait-generator.ts';
import { scenarioSpec } from '../../src/sim/scenarios.ts';
import { demoWalkSpec } from '../../src/sim/demo-trials.ts';
import { isWireEvent, type WireItem } from '../../src/sim/wire.ts';
import { writeNdjson } from '../../src/sim/writers.ts';

stageChecklist('estimateStrides', estimateStrides);

/** A smoothed sample, as the smoothing stage leaves it. */
function smoothed(tS: number, mm: number, muscle = 'calf'): Sample {
  const s = sample(tS, muscle, mm);
  s.smoothMm = mm;
  return s;
}

/** An invented cycle shape (mm) at angle x; one minimum per cycle, a little after x = 0. */
function waveMm(x: number): number {
  return 50 - 5 * Math.cos(x) + 1.5 * Math.sin(2 * x);
}

/** Where in the cycle (0–1) the invented shape has its minimum, found on a fine grid. */
function minimumPhase(): number {
  let best = 0;
  for (let i = 1; i < 100_000; i++) if (waveMm((2 * Math.PI * i) / 100_000) < waveMm((2 * Math.PI * best) / 100_000)) best = i;
  return best / 100_000;
}

/** An invented periodic fascicle length with period periodS, its cycles starting at phaseS. */
function wave(periodS: number, phaseS: number, untilS: number, rateHz = 100, muscle = 'calf'): Sample[] {
  const out: Sample[] = [];
  for (let i = 0; i / rateHz < untilS; i++) {
    const t = i / rateHz;
    const x = 2 * Math.PI * ((t - phaseS) / periodS);
    out.push(smoothed(t, waveMm(x), muscle));
  }
  return out;
}

function boundaries(frames: Frame[]): StrideBoundary[] {
  return frames.filter((f): f is StrideBoundary => f.kind === 'stride');
}

describe('dominantPeriod', () => {
  it('finds the period of a two-harmonic wave, not a multiple or a half of it', () => {
    const samples = wave(1.23, 0.3, 10);
    const p = dominantPeriod(
      samples.map((s) => s.tS),
      samples.map((s) => s.smoothMm),
      samples.length,
    );
    expect(p?.periodS).toBeCloseTo(1.23, 2);
  });

  it('finds a steady period to within 2 ms over 10 s sampled at 100 Hz', () => {
    const t = Array.from({ length: 1000 }, (_, i) => i / 100);
    const x = t.map((v) => Math.sin((2 * Math.PI * v) / 1.234));
    expect(Math.abs((dominantPeriod(t, x, t.length)?.periodS ?? 0) - 1.234)).toBeLessThan(0.002);
  });

  it('resamples on a 10 ms grid unless told otherwise (the documented default; a numerical resolution, not a finding)', () => {
    const t = Array.from({ length: 1000 }, (_, i) => i / 100);
    const x = t.map((v) => Math.sin((2 * Math.PI * v) / 1.234));
    expect(DEFAULT_GRID_S).toBe(0.01);
    expect(dominantPeriod(t, x, t.length)).toEqual(dominantPeriod(t, x, t.length, { gridS: 0.01 }));
  });

  it('keeps the period of a cycle with two bumps (a second harmonic stronger than the first), not half of it', () => {
    // x = 0.6 sin(2πt/T) + sin(4πt/T): the autocorrelation at T/2 is (1 − 0.36)/(1 + 0.36) = 0.47 of that at T, under 0.85.
    const t = Array.from({ length: 1000 }, (_, i) => i / 100);
    const x = t.map((v) => 0.6 * Math.sin((2 * Math.PI * v) / 1.2) + Math.sin((4 * Math.PI * v) / 1.2));
    expect(dominantPeriod(t, x, t.length)?.periodS).toBeCloseTo(1.2, 1);
  });

  it('takes a cycle that alternates a little from one to the next (a slower part 30 % of the main one) for one stride, not two', () => {
    // x = sin(2πt/T) + 0.3 sin(πt/T): it repeats exactly only every 2T, where the autocorrelation peaks highest, but at T it is
    // (1 − 0.09)/(1 + 0.09) = 0.83 of that, above 0.85 of the peak once the shorter lag's smaller bias is counted.
    const t = Array.from({ length: 1000 }, (_, i) => i / 100);
    const x = t.map((v) => Math.sin((2 * Math.PI * v) / 1.0) + 0.3 * Math.sin((Math.PI * v) / 1.0));
    expect(dominantPeriod(t, x, t.length)?.periodS).toBeCloseTo(1.0, 1);
  });

  it('says null for a flat or too short signal', () => {
    expect(dominantPeriod([0, 1, 2, 3], [5, 5, 5, 5], 4)).toBeNull();
    expect(dominantPeriod([0, 0.5], [1, 2], 2)).toBeNull();
  });
});

describe('estimateStrides', () => {
  it('says one boundary per cycle at its shortest length, numbers samples by them, and keeps every frame in order', async () => {
    const input = wave(1.2, 0.45, 20);
    const batches: Batch[] = [];
    for (let i = 0; i < input.length; i += 7) batches.push(input.slice(i, i + 7));
    const out = (await runBatches(estimateStrides({ windowS: 6 }), batches)).flat();
    const found = boundaries(out);
    expect(found.map((b) => b.index)).toEqual([...Array(found.length).keys()]);
    expect(found.length).toBeGreaterThanOrEqual(16);
    const first = 0.45 + minimumPhase() * 1.2 - 1.2;
    const offset = Math.round(((found[0]?.tS ?? 0) - first) / 1.2);
    // Each boundary within one sample (10 ms) of the true minimum.
    found.forEach((b, k) => expect(Math.abs(b.tS - (first + (k + offset) * 1.2))).toBeLessThanOrEqual(0.0101));
    expect(found.every((b) => b.segmentation === 'estimated')).toBe(true);
    const samples = out.filter((f): f is Sample => f.kind === 'sample');
    expect(samples).toEqual(input);
    for (const s of samples) {
      const expected = found.filter((b) => b.tS <= s.tS).length - 1;
      expect(s.strideIndex).toBe(expected);
    }
    const notice = out.find((f) => f.kind === 'notice');
    expect(notice).toMatchObject({ muscle: 'calf' });
    expect((notice as { text: string }).text).toContain('ESTIMATED');
  });

  it('counts every full cycle: a steady 12-cycle walk whose last minimum lies half a period before its end gives 11 strides', async () => {
    // Minima of 50 + 5·cos(2πt/1.1) at 0.55 + 1.1k s, k = 0…11; the trial ends at 13.2 s, 0.55 s after the last one.
    const input: Sample[] = [];
    for (let i = 0; i <= 1320; i++) input.push(smoothed(i / 100, 50 + 5 * Math.cos((2 * Math.PI * i) / 110)));
    const found = boundaries(await runFrames(estimateStrides(), [input]));
    expect(found.map((b) => Math.round(b.tS * 100) / 100)).toEqual(Array.from({ length: 12 }, (_, k) => Math.round((0.55 + 1.1 * k) * 100) / 100));
  });

  it('does not take the end of a falling stretch for a cycle’s minimum', async () => {
    // The same walk cut at 12.5 s, between its last maximum (12.1 s) and the minimum it never reaches (12.65 s).
    const input: Sample[] = [];
    for (let i = 0; i <= 1250; i++) input.push(smoothed(i / 100, 50 + 5 * Math.cos((2 * Math.PI * i) / 110)));
    const found = boundaries(await runFrames(estimateStrides(), [input]));
    expect(found.at(-1)?.tS).toBeCloseTo(11.55, 6);
    expect(found).toHaveLength(11);
  });

  it('holds frames only for the window, then about half a period', () => {
    const input = wave(1.0, 0.2, 12);
    const subject = new Subject<Batch>();
    let released = 0;
    subject.pipe(estimateStrides({ windowS: 4 })).subscribe((b) => (released += b.filter((f) => f.kind === 'sample').length));
    input.forEach((s, i) => {
      subject.next([s]);
      const waiting = i + 1 - released;
      // Nothing before the window filled (4 s); after it, no sample waits more than about half a period (50 samples).
      if (s.tS < 4 - 1e-9) expect(released).toBe(0);
      else if (s.tS > 6) expect(waiting).toBeLessThanOrEqual(60);
    });
    subject.complete();
    expect(released).toBe(input.length);
  });

  it('passes everything unchanged for a muscle whose strides come from foot strikes', async () => {
    const frames: Frame[] = [header({ muscles: { calf: { side: 'left' } } }), smoothed(0, 50), { kind: 'stride', muscle: 'calf', side: 'left', index: 0, tS: 0.01 }, smoothed(0.01, 51)];
    const out = await runFrames(estimateStrides({ windowS: 2 }), [frames, [smoothed(0.02, 52)]]);
    expect(out).toEqual([...frames, smoothed(0.02, 52)].map((f) => (f.kind === 'sample' ? expect.objectContaining({ tS: f.tS }) : f)));
    expect(out.some((f) => f.kind === 'notice')).toBe(false);
  });

  it('counts no strides for a signal with no steady period, and says so', async () => {
    const flat = Array.from({ length: 600 }, (_, i) => smoothed(i / 100, 50));
    const out = await runFrames(estimateStrides({ windowS: 3 }), [flat]);
    expect(boundaries(out)).toEqual([]);
    expect(out.filter((f) => f.kind === 'sample')).toHaveLength(600);
    expect((out.find((f) => f.kind === 'notice') as { text: string }).text).toContain('no strides are counted');
  });

  it('does not use foot strikes that arrive after the strides were estimated, and says so', async () => {
    const input: Frame[] = wave(1.0, 0.3, 8);
    input.push({ kind: 'stride', muscle: 'calf', side: 'left', index: 0, tS: 8 }, smoothed(8.01, 50));
    const out = await runFrames(estimateStrides({ windowS: 4 }), [input]);
    expect(boundaries(out).every((b) => b.segmentation === 'estimated')).toBe(true);
    expect(out.some((f) => f.kind === 'notice' && f.text.includes('not used'))).toBe(true);
  });
});

let dir = '';
beforeAll(async () => {
  dir = await mkdtemp(join(tmpdir(), 'lengthwise-estimate-'));
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

/** A generated trial's records written to a file of this name with its gait events left out, and the summary of its replay. */
async function summaryWithoutEvents(records: Iterable<WireItem>, name: string): Promise<SummaryJson> {
  const path = join(dir, name);
  const items = function* () {
    for (const item of records) if (typeof item === 'string' || !isWireEvent(item)) yield item;
  };
  expect((await writeNdjson(items(), path)).ok).toBe(true);
  return summaryJson(await runTrial(fileSource(path), { source: path }).done);
}

describe('estimateStrides on a generated walking trial with its gait events removed (replay path)', () => {
  it('finds the true number of strides, each boundary at a true cycle minimum', async () => {
    const trial = createTrial(scenarioSpec('walk', { seed: 11, durationS: 40 }));
    const summary = await summaryWithoutEvents(trial.records({ badLines: 'none' }), 'walk-no-events.ndjson');
    expect(summary.frames.gait_events).toBe(0);
    for (const muscle of ['calf', 'thigh']) {
      const m = summary.muscles[muscle];
      expect(m?.segmentation).toBe('estimated');
      expect(summary.warnings.some((w) => w.startsWith(`${muscle}:`) && w.includes('ESTIMATED'))).toBe(true);
      // True cycle minima: where the true length is the lowest within half a mean stride (0.55 s) either side.
      const half = 0.55;
      const minima: number[] = [];
      for (let t = 0; t < 40; t += 0.002) {
        const v = trial.truth.trueSarcomereUm(muscle, t);
        let lowest = true;
        for (let u = Math.max(0, t - half); u <= Math.min(40, t + half) && lowest; u += 0.01) if (trial.truth.trueSarcomereUm(muscle, u) < v) lowest = false;
        if (lowest && (minima.length === 0 || t - (minima.at(-1) as number) > half)) minima.push(t);
      }
      // Every full cycle counts: one stride between each two neighbouring minima, the first and last included, as
      // long as the trial shows the signal falling to the minimum and rising from it by the cycle's depth (30 % of
      // its range: about a fifth of a stride of this near-sinusoidal walk on each side); nearer the trial's edge a
      // minimum cannot be told from the edge itself.
      const seen = minima.filter((t) => t >= 0.2 && t <= 40 - 0.2);
      const strides = m?.strides ?? [];
      expect(strides.length).toBe(seen.length - 1);
      for (const s of strides) {
        const nearest = Math.min(...minima.map((t) => Math.abs(t - s.start_s)));
        // Within 0.08 s (7% of a stride): the smoothing's lag and the noise on a flat minimum.
        expect(nearest).toBeLessThan(0.08);
        expect(s.stance).toBeNull();
      }
      const trueStrides = trial.truth.strides(muscle);
      const meanTrue = trueStrides.reduce((a, s) => a + s.endS - s.startS, 0) / trueStrides.length;
      const meanFound = strides.reduce((a, s) => a + s.duration_s, 0) / strides.length;
      expect(Math.abs(meanFound - meanTrue) / meanTrue).toBeLessThan(0.02);
      expect(m?.cycle?.percent).toHaveLength(101);
    }
  });
});

describe('estimateStrides on the demo walking trial with its gait events removed', () => {
  it('finds the true number of strides within one, of the true period, and flags the stride with the dropout', async () => {
    const trial = createTrial(demoWalkSpec());
    const summary = await summaryWithoutEvents(trial.records(), 'demo-walk-no-events.ndjson');
    for (const muscle of ['calf', 'thigh']) {
      const m = summary.muscles[muscle];
      const truth = trial.truth.strides(muscle);
      const meanTrueS = truth.reduce((a, s) => a + s.endS - s.startS, 0) / truth.length;
      expect(m?.segmentation).toBe('estimated');
      expect(Math.abs((m?.strides.length ?? 0) - truth.length)).toBeLessThanOrEqual(1);
      for (const s of m?.strides ?? []) if (!s.flagged) expect(Math.abs(s.duration_s - meanTrueS) / meanTrueS).toBeLessThan(0.15);
    }
    // The calf's tracking is lost from 22.4 to 22.9 s (the demo's dropout): the stride holding it is flagged.
    const calf = summary.muscles['calf']?.strides ?? [];
    expect(calf.filter((s) => s.flagged).map((s) => s.start_s < 22.9 && s.end_s > 22.4)).toEqual([true]);
  });
});

describe('estimateStrides when a muscle falls silent', () => {
  it.each([
    ['inside its window', 2],
    ['after its window', 6],
  ])('does not hold the other muscles back when it stops %s: it is decided and its pending boundary settled by the stream’s time', (_, stopS) => {
    const subject = new Subject<Batch>();
    let released = 0;
    subject.pipe(estimateStrides({ windowS: 4 })).subscribe((b) => (released += b.filter((f) => f.kind === 'sample').length));
    // Both muscles wave, then the calf stops; the thigh goes on to 20 s.
    const calf = wave(1.0, 0.2, stopS, 100, 'calf');
    const thigh = wave(1.1, 0.5, 20, 100, 'thigh');
    let sent = 0;
    thigh.forEach((s, i) => {
      const c = calf[i];
      if (c !== undefined) {
        subject.next([c]);
        sent++;
      }
      subject.next([s]);
      sent++;
      if (s.tS > 10) expect(sent - released).toBeLessThan(150);
    });
    subject.complete();
    expect(released).toBe(sent);
  });
});

describe('estimateStrides bounded by count and time, never by the time a sample claims', () => {
  it('starts a window again after a hole longer than the longest period: the samples before wait, the walk after it gives the period', async () => {
    const before = wave(1.0, 0.2, 0.5);
    const after = wave(1.0, 0.2, 12).map((s) => smoothed(s.tS + 1e8, s.smoothMm));
    const out = await runFrames(estimateStrides({ windowS: 6 }), [before, after]);
    expect(out.filter((f) => f.kind === 'sample')).toHaveLength(before.length + after.length);
    const found = boundaries(out);
    expect(found.length).toBeGreaterThanOrEqual(5);
    expect(found.every((b) => b.tS > 1e8)).toBe(true);
    for (const s of out) if (s.kind === 'sample' && s.tS < 1e8) expect(s.strideIndex).toBe(-1);
  });

  it('never holds a rejection: a stuck clock’s duplicates pass at once while the window fills', () => {
    const subject = new Subject<Batch>();
    const passed: Frame[] = [];
    subject.pipe(estimateStrides({ windowS: 4 })).subscribe((b) => passed.push(...b));
    subject.next([smoothed(0, 50)]);
    for (let i = 0; i < 1000; i++) {
      subject.next([{ kind: 'rejection', reason: 'duplicate', message: 'same time', line: i + 2, excerpt: '' }]);
    }
    expect(passed.filter((f) => f.kind === 'rejection')).toHaveLength(1000);
    expect(passed.filter((f) => f.kind === 'sample')).toHaveLength(0);
    subject.complete();
    expect(passed.filter((f) => f.kind === 'sample')).toHaveLength(1);
  });

  it('holds at most maxHeldFrames: past it, the window is decided from what it holds and the frames go', () => {
    const subject = new Subject<Batch>();
    let released = 0;
    subject.pipe(estimateStrides({ windowS: 1000, maxHeldFrames: 500 })).subscribe((b) => (released += b.length));
    // A clock that crawls: 2000 samples in a millisecond never fill a 1000 s window.
    for (let i = 0; i < 2000; i++) {
      subject.next([smoothed(i * 5e-7, 50 + (i % 3))]);
      expect(i + 1 - released).toBeLessThanOrEqual(502);
    }
    subject.complete();
  });
});

describe('dominantPeriod bounded by count', () => {
  it('resamples at most maxGridPoints points, however far apart the times claim to be', () => {
    const samples = wave(1.23, 0.3, 20);
    const tS = samples.map((s) => s.tS);
    tS.push(1e300);
    const mm = samples.map((s) => s.smoothMm);
    mm.push(50);
    const p = dominantPeriod(tS, mm, tS.length, { maxGridPoints: 2000 });
    expect(p?.periodS).toBeCloseTo(1.23, 1);
  });
});
