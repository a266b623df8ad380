import { describe, expect, it } from 'vitest';
import { checkTrialSpec, createTrial, type TrialSpec } from '../../src/sim/gait-generator.ts';
import { scenarioSpec } from '../../src/sim/scenarios.ts';
import { isWireEvent, isWireSample, type WireItem, type WireSample } from '../../src/sim/wire.ts';
import { toNdjson } from '../../src/sim/writers.ts';
import { speciesCurve } from '../../src/model/species.ts';
import { REJECT_REASONS } from '../../src/trial/reasons.ts';
import { createClassifier } from './stream-check.ts';

function take<T>(items: Iterable<T>, n: number): T[] {
  const out: T[] = [];
  if (n <= 0) return out;
  for (const x of items) {
    out.push(x);
    if (out.length >= n) break;
  }
  return out;
}

function samples(items: Iterable<WireItem>): WireSample[] {
  const out: WireSample[] = [];
  for (const x of items) if (typeof x !== 'string' && isWireSample(x)) out.push(x);
  return out;
}

const walk10 = (): TrialSpec => scenarioSpec('walk', { seed: 7, durationS: 10 });

describe('createTrial', () => {
  it('gives the same bytes for the same seed, and different bytes for another seed', () => {
    const a = toNdjson(createTrial(walk10()).records());
    const b = toNdjson(createTrial(walk10()).records());
    const c = toNdjson(createTrial({ ...walk10(), seed: 8 }).records());
    expect(a).toBe(b);
    expect(c).not.toBe(a);
  });

  it('yields the same items when its records are iterated twice', () => {
    const trial = createTrial(walk10());
    expect(toNdjson(trial.records())).toBe(toNdjson(trial.records()));
  });

  it('starts with a header declaring sides and the true calibration of every muscle', () => {
    const [header] = take(createTrial(walk10()).records(), 1);
    expect(header).toEqual({
      format: 'lengthwise-stream',
      version: 1,
      rate_hz: 100,
      muscles: { calf: { side: 'left' }, thigh: { side: 'right' } },
      calibration: {
        muscles: {
          calf: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: 17_500 },
          thigh: { species: 'human', method: 'sarcomere_count', sarcomeres_in_series: 30_000 },
        },
      },
    });
  });

  it('leaves the header out when the spec has none or the caller asks', () => {
    const spec = { ...walk10(), header: null };
    expect(typeof take(createTrial(spec).records(), 1)[0]).toBe('object');
    expect(isWireSample(take(createTrial(spec).records(), 1)[0] as WireSample)).toBe(true);
    const first = take(createTrial(walk10()).records({ header: false }), 1)[0] as WireSample;
    expect(isWireSample(first)).toBe(true);
  });

  it('writes one sample per muscle per tick at the given rate, times increasing', () => {
    const trial = createTrial(scenarioSpec('walk', { durationS: 10, rateHz: 250 }));
    const s = samples(trial.records());
    expect(s).toHaveLength(10 * 250 * 2);
    const calf = s.filter((x) => x.muscle === 'calf');
    expect(calf[1]?.t).toBeCloseTo(0.004, 9);
    for (let i = 1; i < calf.length; i++) expect((calf[i] as WireSample).t).toBeGreaterThan((calf[i - 1] as WireSample).t);
  });

  it('keeps fascicle length = true sarcomere length × sarcomeres in series / 1000 + noise of the given SD', () => {
    // The conversion is the definition the tool inverts (common practice, no source).
    const trial = createTrial(scenarioSpec('walk', { seed: 3, durationS: 60 }));
    for (const m of trial.spec.muscles) {
      const residualsUm: number[] = [];
      for (const s of samples(trial.records())) {
        if (s.muscle !== m.name) continue;
        residualsUm.push((s.fascicle_mm * 1000) / m.sarcomeresInSeries - trial.truth.trueSarcomereUm(m.name, s.t));
      }
      const mean = residualsUm.reduce((a, b) => a + b, 0) / residualsUm.length;
      const sd = Math.sqrt(residualsUm.reduce((a, b) => a + (b - mean) ** 2, 0) / residualsUm.length);
      const noiseSdUm = (m.noiseSdMm * 1000) / m.sarcomeresInSeries;
      expect(Math.abs(mean)).toBeLessThan(noiseSdUm * 0.05);
      expect(sd).toBeGreaterThan(noiseSdUm * 0.95);
      expect(sd).toBeLessThan(noiseSdUm * 1.05);
      expect(Math.max(...residualsUm.map(Math.abs))).toBeLessThan(noiseSdUm * 5.5);
      expect(trial.truth.trueFascicleMm(m.name, 12.34)).toBeCloseTo(
        (trial.truth.trueSarcomereUm(m.name, 12.34) * m.sarcomeresInSeries) / 1000,
        12,
      );
    }
  });

  it('puts the calf on the shallow ascending limb and plateau and takes the thigh onto the descending limb', () => {
    // Human plateau 2.64–2.81 µm (Rassier, MacIntosh & Herzog 1999, J Appl Physiol 86:1445–1457).
    const curve = speciesCurve('human');
    expect(curve.plateauStartUm).toBeCloseTo(2.64, 2);
    expect(curve.plateauEndUm).toBeCloseTo(2.81, 2);
    const trial = createTrial(scenarioSpec('walk', { durationS: 30 }));
    const calf = trial.truth.strides('calf');
    const thigh = trial.truth.strides('thigh');
    expect(Math.min(...calf.map((s) => s.slMinUm))).toBeLessThan(curve.plateauStartUm);
    expect(Math.min(...calf.map((s) => s.slMinUm))).toBeGreaterThan(curve.steepBreakUm);
    expect(Math.max(...calf.map((s) => s.slMaxUm))).toBeGreaterThan(curve.plateauEndUm);
    expect(Math.max(...calf.map((s) => s.slMaxUm))).toBeLessThan(3.0);
    expect(Math.max(...thigh.map((s) => s.slMaxUm))).toBeGreaterThan(3.1);
    expect(Math.max(...thigh.map((s) => s.slMaxUm))).toBeLessThan(curve.descendingZeroUm);
  });

  it('writes the foot strikes and toe-offs the truth lists, alternating sides, about one per stride each', () => {
    const trial = createTrial(scenarioSpec('walk', { durationS: 60 }));
    const events = [...trial.records()].filter((x) => typeof x !== 'string' && isWireEvent(x));
    for (const side of ['left', 'right'] as const) {
      const strikes = trial.truth.footStrikes(side);
      expect(events.filter((e) => e.event === 'foot_strike' && e.side === side).map((e) => e.t)).toEqual(strikes);
      expect(events.filter((e) => e.event === 'toe_off' && e.side === side).map((e) => e.t)).toEqual(trial.truth.toeOffs(side));
      // 60 s at a 1.1 s mean stride with a 2 % CV.
      expect(strikes.length).toBeGreaterThanOrEqual(53);
      expect(strikes.length).toBeLessThanOrEqual(56);
    }
    const strikeSides = events.filter((e) => e.event === 'foot_strike').map((e) => e.side);
    for (let i = 1; i < strikeSides.length; i++) expect(strikeSides[i]).not.toBe(strikeSides[i - 1]);
  });

  it('gives one true stride between each pair of consecutive foot strikes of the muscle side', () => {
    const trial = createTrial(scenarioSpec('walk', { durationS: 20 }));
    const strikes = trial.truth.footStrikes('right');
    const strides = trial.truth.strides('thigh');
    expect(strides).toHaveLength(strikes.length - 1);
    strides.forEach((s, i) => {
      expect(s.index).toBe(i);
      expect(s.startS).toBe(strikes[i]);
      expect(s.endS).toBe(strikes[i + 1]);
      expect(s.endS - s.startS).toBeGreaterThan(1.1 * 0.9);
      expect(s.endS - s.startS).toBeLessThan(1.1 * 1.1);
      for (let t = s.startS; t <= s.endS; t += 0.01) {
        expect(trial.truth.trueSarcomereUm('thigh', t)).toBeGreaterThanOrEqual(s.slMinUm - 1e-9);
        expect(trial.truth.trueSarcomereUm('thigh', t)).toBeLessThanOrEqual(s.slMaxUm + 1e-9);
      }
    });
  });

  it('has no jumps: the true length of a running thigh changes by under 0.06 µm in 10 ms', () => {
    // A bound of our own for the invented scenario (6 µm/s of sarcomere velocity), not a physiological limit.
    const trial = createTrial(scenarioSpec('run', { durationS: 20 }));
    for (let t = 0; t < 20; t += 0.01) {
      expect(Math.abs(trial.truth.trueSarcomereUm('thigh', t + 0.01) - trial.truth.trueSarcomereUm('thigh', t))).toBeLessThan(0.06);
    }
  });

  it('iterates lazily: an endless trial and a 17-million-sample trial yield their first items at once', () => {
    const endless = createTrial(scenarioSpec('walk', { durationS: Infinity }));
    expect(endless.ticks).toBe(Infinity);
    expect(samples(take(endless.records(), 1001)).length).toBeGreaterThan(950);
    const huge = createTrial(scenarioSpec('walk', { durationS: 85_000 }));
    expect(huge.ticks * huge.spec.muscles.length).toBe(17_000_000);
    expect(samples(take(huge.records(), 11))).toHaveLength(10);
    expect(huge.truth.trueSarcomereUm('calf', 84_999)).toBeGreaterThan(2.2);
  });

  it('drops samples in a missing window and sends quality near 0 in a low-quality window', () => {
    const spec: TrialSpec = {
      ...walk10(),
      dropouts: [
        { muscle: 'calf', fromS: 2, toS: 2.3, mode: 'low_quality' },
        { muscle: 'calf', fromS: 2.3, toS: 2.5, mode: 'missing' },
      ],
    };
    const trial = createTrial(spec);
    const calf = samples(trial.records()).filter((s) => s.muscle === 'calf');
    expect(calf.filter((s) => s.t >= 2.3 - 1e-9 && s.t < 2.5 - 1e-9)).toHaveLength(0);
    const lost = calf.filter((s) => s.t >= 2 - 1e-9 && s.t < 2.3 - 1e-9);
    expect(lost).toHaveLength(30);
    for (const s of lost) expect(s.quality).toBeLessThan(0.15);
    for (const s of calf.filter((x) => x.t < 2 || x.t >= 2.5)) expect(s.quality).toBeGreaterThanOrEqual(0.88);
    expect(calf).toHaveLength(1000 - 20);
    expect(trial.truth.dropoutAt('calf', 2.1)).toBe('low_quality');
    expect(trial.truth.dropoutAt('calf', 2.4)).toBe('missing');
    expect(trial.truth.dropoutAt('thigh', 2.4)).toBeNull();
  });

  it('repeats a dropout window when asked', () => {
    const spec: TrialSpec = { ...walk10(), dropouts: [{ muscle: 'thigh', fromS: 1, toS: 1.2, mode: 'missing', repeatEveryS: 3 }] };
    const trial = createTrial(spec);
    expect(samples(trial.records()).filter((s) => s.muscle === 'thigh')).toHaveLength(1000 - 3 * 20);
    expect(trial.truth.dropoutAt('thigh', 7.1)).toBe('missing');
  });

  it('writes one bad line of each kind, each read as the reason it was made for', () => {
    const spec: TrialSpec = {
      ...walk10(),
      badLines: REJECT_REASONS.map((reason, i) => ({ atS: 1 + i * 0.5, reason, muscle: i % 2 === 0 ? 'calf' : 'thigh' })),
    };
    const check = createClassifier();
    const kinds = toNdjson(createTrial(spec).records()).trimEnd().split('\n').map((l) => check.ndjson(l));
    const bad = kinds.filter((k) => k !== 'header' && k !== 'sample' && k !== 'event' && k !== 'marker');
    expect(bad).toEqual([...REJECT_REASONS]);
  });

  it('leaves the bad lines out when asked, and the samples stay the same', () => {
    const spec: TrialSpec = { ...walk10(), badLines: [{ atS: 2, reason: 'not_json' }] };
    const trial = createTrial(spec);
    const withBad = [...trial.records()];
    const without = [...trial.records({ badLines: 'none' })];
    expect(withBad.length).toBe(without.length + 1);
    expect(samples(withBad)).toEqual(samples(without));
  });

  it('reports the problems of a spec it cannot generate instead of producing nonsense', () => {
    const bad: TrialSpec = { ...walk10(), muscles: [], rateHz: 0 };
    expect(checkTrialSpec(bad)).toEqual([
      'rate 0 Hz: give a rate above 0 and at most 10000 Hz',
      'no muscles: give at least one',
    ]);
    expect(() => createTrial(bad)).toThrow(RangeError);
    expect(() => createTrial(walk10()).truth.trueSarcomereUm('soleus', 1)).toThrow(/unknown muscle "soleus"/);
  });
});
