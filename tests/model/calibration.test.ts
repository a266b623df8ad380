import { describe, expect, it } from 'vitest';
import {
  checkCalibrationAgainstTrial,
  fascicleOffsetMm,
  modelOptionsFor,
  muscleModelFor,
  sarcomereCountSpread,
  sarcomereUmFromFascicle,
  sarcomeresInSeries,
  type MuscleCalibration,
} from '../../src/model/calibration.ts';
import { plateauMiddleUm } from '../../src/model/geometry.ts';
import { speciesCurve } from '../../src/model/species.ts';

const human = speciesCurve('human');

describe('sarcomere length from fascicle length', () => {
  it('is fascicle (mm) × 1000 / sarcomeres in series', () => {
    expect(sarcomereUmFromFascicle(54, 20_000)).toBeCloseTo(2.7, 12);
  });
});

describe('sarcomeresInSeries', () => {
  it('takes a given count as it is', () => {
    expect(sarcomeresInSeries({ species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 17_500 }, human)).toBe(17_500);
  });

  it('divides a reference fascicle length by its reference sarcomere length', () => {
    expect(
      sarcomeresInSeries({ species: 'human', method: 'reference', referenceFascicleMm: 80, referenceSarcomereUm: 2.5 }, human),
    ).toBeCloseTo(32_000, 9);
  });

  it('puts an optimal fascicle length at the plateau middle of the muscle’s curve', () => {
    const cal: MuscleCalibration = { species: 'human', method: 'optimal_length', optimalFascicleMm: 60 };
    const n = sarcomeresInSeries(cal, human);
    expect(sarcomereUmFromFascicle(60, n)).toBeCloseTo(plateauMiddleUm(human), 12);
  });
});

describe('sarcomereCountSpread', () => {
  it('propagates reference SDs in quadrature (first-order error propagation; common practice, no source)', () => {
    const s = sarcomereCountSpread(
      { species: 'human', method: 'reference', referenceFascicleMm: 80, referenceSarcomereUm: 2.5, referenceSarcomereSdUm: 0.075, referenceFascicleSdMm: 3.2 },
      human,
    );
    expect(s.relativeSd).toBeCloseTo(Math.hypot(0.03, 0.04), 12);
    expect(s.relativeSd).toBeCloseTo(0.05, 12);
  });

  it('is 0 when no uncertainty is stated', () => {
    expect(sarcomereCountSpread({ species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 20_000 }, human).relativeSd).toBe(0);
  });

  it('takes a count SD and an optimal-length SD', () => {
    expect(
      sarcomereCountSpread({ species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 20_000, sarcomeresInSeriesSd: 1000 }, human).relativeSd,
    ).toBeCloseTo(0.05, 12);
    expect(
      sarcomereCountSpread({ species: 'frog', method: 'optimal_length', optimalFascicleMm: 10, optimalFascicleSdMm: 0.5 }, speciesCurve('frog')).relativeSd,
    ).toBeCloseTo(0.05, 12);
  });
});

describe('muscleModelFor', () => {
  it('builds the muscle’s curve from its species, filaments, shape and dispersion', () => {
    const cal: MuscleCalibration = {
      species: 'frog',
      method: 'sarcomere_count',
      sarcomeresInSeries: 5000,
      filaments: { thinUm: 0.95 },
      shape: 'gaussian',
      dispersionSdUm: 0.1,
    };
    expect(modelOptionsFor(cal)).toEqual({ species: 'frog', filaments: { thinUm: 0.95 }, shape: 'gaussian', dispersionSdUm: 0.1 });
    const m = muscleModelFor(cal);
    expect(m.curve.plateauStartUm).toBeCloseTo(1.95, 9);
    expect(m.shape).toBe('gaussian');
    expect(m.dispersionSdUm).toBe(0.1);
  });

  it('leaves out what the calibration does not say', () => {
    expect(modelOptionsFor({ species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 1 })).toEqual({ species: 'human' });
  });
});

describe('checkCalibrationAgainstTrial', () => {
  it('passes a count that keeps the trial within 1–5 µm', () => {
    const r = checkCalibrationAgainstTrial('calf', 20_000, 40, 70);
    expect(r).toMatchObject({ ok: true });
    expect(r.slMinUm).toBeCloseTo(2, 12);
    expect(r.slMaxUm).toBeCloseTo(3.5, 12);
  });

  it('flags a count implying sarcomeres longer than 5 µm and says which counts fit', () => {
    const r = checkCalibrationAgainstTrial('calf', 2_000, 40, 70);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.message).toMatch(/calf: 2000 sarcomeres in series put this trial's fascicle lengths \(40.0–70.0 mm\) at 20.00–35.00 µm/);
    expect(r.message).toMatch(/a count from 14000 to 40000 keeps them within 1–5 µm/);
  });

  it('flags a count implying sarcomeres shorter than 1 µm', () => {
    expect(checkCalibrationAgainstTrial('calf', 100_000, 40, 70).ok).toBe(false);
  });

  it('says when no count can fit (a range wider than fivefold)', () => {
    const r = checkCalibrationAgainstTrial('calf', 20_000, 5, 70);
    expect(r.ok === false && r.message).toMatch(/no single count keeps them within 1–5 µm/);
  });

  it('flags a non-positive or NaN count', () => {
    expect(checkCalibrationAgainstTrial('calf', 0, 40, 70).ok).toBe(false);
    expect(checkCalibrationAgainstTrial('calf', Number.NaN, 40, 70).ok).toBe(false);
  });
});

describe('the count’s spread and the constant part of the tracked length', () => {
  it('is lognormal for an error in the count, and normal in the length for an error in the reference sarcomere length', () => {
    expect(sarcomereCountSpread({ species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 20_000, sarcomeresInSeriesSd: 1000 }, human).shape).toBe('lognormal');
    expect(
      sarcomereCountSpread(
        { species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 20_000, sarcomeresInSeriesSd: 1000, sarcomeresInSeriesSdFrom: 'sarcomere_length' },
        human,
      ).shape,
    ).toBe('length_normal');
    expect(
      sarcomereCountSpread({ species: 'human', method: 'reference', referenceFascicleMm: 80, referenceSarcomereUm: 2.5, referenceSarcomereSdUm: 0.1 }, human).shape,
    ).toBe('length_normal');
    expect(
      sarcomereCountSpread(
        { species: 'human', method: 'reference', referenceFascicleMm: 80, referenceSarcomereUm: 2.5, referenceSarcomereSdUm: 0.1, referenceFascicleSdMm: 2 },
        human,
      ).shape,
    ).toBe('lognormal');
  });

  it('takes N from a published fibre length normalised to a sarcomere length, its SD from the fibre length’s', () => {
    // An invented table entry: 60 mm ± 12 mm at 2.7 µm gives 22 222 sarcomeres, relative SD 0.2.
    const s = sarcomereCountSpread(
      { species: 'human', method: 'architecture_prior', priorFibreMm: 60, priorFibreSdMm: 12, priorSarcomereUm: 2.7, priorSource: 'invented' },
      human,
    );
    expect(s.count).toBeCloseTo(60_000 / 2.7, 9);
    expect(s.relativeSd).toBeCloseTo(0.2, 12);
    expect(s.shape).toBe('lognormal');
  });

  it('subtracts the constant part of the tracked length before dividing by the count', () => {
    expect(sarcomereUmFromFascicle(66, 20_000, 12)).toBeCloseTo(2.7, 12);
    expect(fascicleOffsetMm({ species: 'human', method: 'sarcomere_count', sarcomeresInSeries: 20_000, fascicleOffsetMm: 12 })).toBe(12);
    expect(fascicleOffsetMm({ species: 'human', method: 'optimal_length', optimalFascicleMm: 60 })).toBe(0);
  });
});
