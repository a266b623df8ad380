import { describe, expect, it } from 'vitest';
import { Subject } from 'rxjs';
import { convertSarcomere } from '../../src/pipeline/convert-sarcomere.ts';
import { header, runBatches, runFrames, sample } from '../helpers/frames.ts';
import { stageChecklist } from '../helpers/stage-checklist.ts';
import type { Batch, CalibrationApplied, Frame, Sample } from '../../src/trial/records.ts';
import type { CalibrationSpec } from '../../src/model/calibration.ts';
import { plateauMiddleUm } from '../../src/model/geometry.ts';
import { speciesCurve } from '../../src/model/species.ts';

/** Middle of the human plateau, 2.64–2.81 µm (Walker & Schrodt 1974; Rassier, MacIntosh & Herzog 1999). */
const HUMAN_MIDDLE_UM = plateauMiddleUm(speciesCurve('human'));

stageChecklist('convertSarcomere', convertSarcomere);

function smoothed(tS: number, muscle: string, mm: number, quality = 1): Sample {
  const s = sample(tS, muscle, mm, { quality });
  s.smoothMm = mm;
  return s;
}

const calfCount: CalibrationSpec = { muscles: { calf: { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 20000 } } };

describe('convertSarcomere', () => {
  it('converts fascicle mm × 1000 / sarcomeres in series to µm (the calibration contract)', async () => {
    const out = await runFrames(convertSarcomere({ calibration: calfCount }), [[smoothed(0, 'calf', 54)]]);
    expect(out[0]).toMatchObject({ kind: 'calibration', muscle: 'calf', sarcomeresInSeries: 20000, source: 'file' });
    expect((out[1] as Sample).sarcomereUm).toBeCloseTo(2.7, 12);
  });

  it('takes a reference calibration as N = reference fascicle × 1000 / reference sarcomere length', async () => {
    const spec: CalibrationSpec = { muscles: { calf: { species: 'human', method: 'reference', referenceFascicleMm: 60, referenceSarcomereUm: 3 } } };
    const out = await runFrames(convertSarcomere({ calibration: spec }), [[smoothed(0, 'calf', 40)]]);
    expect((out[0] as CalibrationApplied).sarcomeresInSeries).toBeCloseTo(20000, 9);
    expect((out[1] as Sample).sarcomereUm).toBeCloseTo(2, 12);
  });

  it("uses the header's calibration when no file gives one, and the file's when both do", async () => {
    const fromHeader: CalibrationSpec = { muscles: { calf: { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 10000 } } };
    const h = header({ calibration: fromHeader });
    const viaHeader = await runFrames(convertSarcomere(), [[h, smoothed(0, 'calf', 27)]]);
    expect(viaHeader[1]).toMatchObject({ kind: 'calibration', source: 'header', sarcomeresInSeries: 10000 });
    const viaFile = await runFrames(convertSarcomere({ calibration: calfCount }), [[h, smoothed(0, 'calf', 27)]]);
    expect(viaFile[1]).toMatchObject({ kind: 'calibration', source: 'file', sarcomeresInSeries: 20000 });
  });

  it('with no calibration, holds frames for the baseline window, then puts the median at the plateau middle', async () => {
    expect(HUMAN_MIDDLE_UM).toBeCloseTo(2.725, 2);
    const batches: Batch[] = [];
    for (let i = 0; i <= 400; i++) batches.push([smoothed(i / 100, 'calf', 54.5)]);
    const outBatches = await runBatches(convertSarcomere({ baselineS: 3 }), batches);
    const out = outBatches.flat();
    const samples = out.filter((f): f is Sample => f.kind === 'sample');
    expect(samples).toHaveLength(401);
    expect(samples.every((s) => Math.abs(s.sarcomereUm - HUMAN_MIDDLE_UM) < 1e-9)).toBe(true);
    expect(out[0]).toMatchObject({ kind: 'calibration', source: 'baseline' });
    expect(out[1]).toMatchObject({ kind: 'notice', muscle: 'calf' });
    expect((out[1] as { text: string }).text).toContain('UNCALIBRATED');
    // Nothing came out before the window had filled: the first output batch is the held window.
    expect(outBatches[0]?.length).toBeGreaterThan(300);
  });

  it('keeps order: frames of calibrated muscles held with an uncalibrated baseline come out in place', async () => {
    const frames: Frame[] = [];
    for (let i = 0; i < 50; i++) frames.push(smoothed(i / 10, 'calf', 54), smoothed(i / 10, 'thigh', 80));
    const out = await runFrames(convertSarcomere({ calibration: calfCount, baselineS: 1 }), [frames]);
    const order = out.filter((f): f is Sample => f.kind === 'sample').map((s) => `${s.muscle}@${s.tS}`);
    expect(order).toEqual(frames.map((f) => `${(f as Sample).muscle}@${(f as Sample).tS}`));
    expect(out.filter((f) => f.kind === 'sample').every((s) => Number.isFinite((s as Sample).sarcomereUm))).toBe(true);
  });

  it('ignores skipped samples when taking the baseline median', async () => {
    const frames: Frame[] = [smoothed(0, 'calf', 54.5), smoothed(0.5, 'calf', 999, 0.01), smoothed(1, 'calf', 54.5), smoothed(1.5, 'calf', 54.5)];
    const out = await runFrames(convertSarcomere({ baselineS: 1 }), [frames]);
    expect((out[0] as CalibrationApplied).sarcomeresInSeries).toBeCloseTo((54.5 * 1000) / HUMAN_MIDDLE_UM, 6);
  });

  it('decides a baseline from what it has when the input ends inside the window', async () => {
    const out = await runFrames(convertSarcomere({ baselineS: 3 }), [[smoothed(0, 'calf', 54.5), smoothed(0.5, 'calf', 54.5)]]);
    expect(out.filter((f) => f.kind === 'sample')).toHaveLength(2);
    expect((out[2] as Sample).sarcomereUm).toBeCloseTo(HUMAN_MIDDLE_UM, 9);
  });

  it('says so, without inventing numbers, when the baseline window holds no usable sample', async () => {
    const out = await runFrames(convertSarcomere({ baselineS: 1 }), [[smoothed(0, 'calf', 50, 0), smoothed(2, 'calf', 50, 0)]]);
    const notice = out.find((f) => f.kind === 'notice');
    expect(notice && 'text' in notice ? notice.text : '').toContain('no usable sample');
    expect(out.filter((f): f is Sample => f.kind === 'sample').every((s) => Number.isNaN(s.sarcomereUm))).toBe(true);
  });

  it('applies a calibration captured while running from that frame on', async () => {
    const input = new Subject<Batch>();
    const seen: Frame[] = [];
    input.pipe(convertSarcomere({ calibration: calfCount })).subscribe((b) => seen.push(...b));
    input.next([smoothed(0, 'calf', 54)]);
    input.next([
      { kind: 'calibration', muscle: 'calf', calibration: { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 27000 }, sarcomeresInSeries: 27000, source: 'runtime' },
      smoothed(0.01, 'calf', 54),
    ]);
    input.complete();
    const samples = seen.filter((f): f is Sample => f.kind === 'sample');
    expect(samples[0]?.sarcomereUm).toBeCloseTo(2.7, 9);
    expect(samples[1]?.sarcomereUm).toBeCloseTo(2, 9);
  });

  it('gives NaN, not a number, for a sample with no smoothed length', async () => {
    const s = sample(0, 'calf', 54);
    const out = await runFrames(convertSarcomere({ calibration: calfCount }), [[s]]);
    expect((out[1] as Sample).sarcomereUm).toBeNaN();
  });
});

describe('convertSarcomere with a muscle that falls silent', () => {
  it('closes its baseline window by the stream time, so other muscles are not held back', async () => {
    const input = new Subject<Batch>();
    const seen: Frame[] = [];
    input.pipe(convertSarcomere({ calibration: calfCount, baselineS: 1 })).subscribe((b) => seen.push(...b));
    input.next([smoothed(0, 'thigh', 80), smoothed(0, 'calf', 54)]);
    for (let i = 1; i <= 300; i++) input.next([smoothed(i / 100, 'calf', 54)]);
    // thigh sent one sample and went quiet; by t = 1 s its window is decided and calf flows.
    const samples = seen.filter((f): f is Sample => f.kind === 'sample');
    expect(samples.length).toBeGreaterThan(250);
    expect(samples.every((s) => Number.isFinite(s.sarcomereUm))).toBe(true);
    expect(seen.some((f) => f.kind === 'calibration' && f.muscle === 'thigh' && f.source === 'baseline')).toBe(true);
    input.complete();
  });
});

describe('convertSarcomere bounded by count', () => {
  it('never holds a rejection: a stuck clock’s duplicates pass at once while a baseline window fills', () => {
    const subject = new Subject<Batch>();
    const passed: Frame[] = [];
    subject.pipe(convertSarcomere()).subscribe((b) => passed.push(...b));
    subject.next([smoothed(0, 'calf', 54)]);
    for (let i = 0; i < 1000; i++) subject.next([{ kind: 'rejection', reason: 'duplicate', message: 'same time', line: i + 2, excerpt: '' }]);
    expect(passed.filter((f) => f.kind === 'rejection')).toHaveLength(1000);
    expect(passed.filter((f) => f.kind === 'sample')).toHaveLength(0);
    subject.complete();
    expect(passed.filter((f) => f.kind === 'sample')).toHaveLength(1);
  });

  it.each([
    ['samples whose clock crawls', (i: number): Frame => smoothed(i * 1e-7, 'calf', 54)],
    ['markers at one time', (i: number): Frame => ({ kind: 'marker', tS: 0, marker: `m${i}`, line: i })],
  ])('holds at most maxHeldFrames of %s: past it, the baseline is taken from what the window holds', (_, frame) => {
    const subject = new Subject<Batch>();
    let released = 0;
    subject.pipe(convertSarcomere({ maxHeldFrames: 300 })).subscribe((b) => (released += b.filter((f) => f.kind !== 'calibration' && f.kind !== 'notice').length));
    subject.next([smoothed(0, 'calf', 54)]);
    for (let i = 1; i < 2000; i++) {
      subject.next([frame(i)]);
      expect(i + 1 - released).toBeLessThanOrEqual(301);
    }
    subject.complete();
    expect(released).toBe(2000);
  });
});
