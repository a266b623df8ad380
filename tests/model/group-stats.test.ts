/**
 * Statistics across subjects, against sources outside the project:
 * - Mean and SD: the NIST Statistical Reference Datasets for univariate summary statistics, NumAcc1–4
 *   (NIST Information Technology Laboratory, StRD; constructed after Simon SD, Lesage JP 1989, Comput
 *   Stat Data Anal 8:325–332), built to expose loss of precision. Their data and certified values (mean
 *   and SD exact by construction) are as described in each data set's header, read here from a
 *   transcription of those pages (the Rqualification package's documentation), not the pages themselves.
 * - t quantiles: the NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2, "Critical values of the
 *   Student's t distribution" (3 decimals), as reprinted in Soong TT 2004, Fundamentals of Probability and
 *   Statistics for Engineers, Wiley, Table A.4.
 * - t quantiles and p-values over a grid: jStat (jstat 1.9.6 from the npm registry, used only here), a
 *   different implementation of the incomplete beta function than the tool's (stdlib).
 * - A worked paired t-test: Student's sleep data (Cushny AR, Peebles AR 1905, J Physiol 32:501–510; the
 *   first illustration of the paired t-test in Student 1908, Biometrika 6:1–25, worked again in Fisher RA
 *   1925, Statistical Methods for Research Workers, Oliver & Boyd, §24).
 */
import { describe, expect, it } from 'vitest';
import jstat from 'jstat';
import { groupFigures, meanOf, pairedTTest, sampleSd, tCritical, tTwoSidedP } from '../../src/model/group-stats.ts';

const { jStat } = jstat;

/** A NumAcc data set: a single centre value, then 500 pairs of centre − step, centre + step (1001 values). */
function numAcc(centre: number, low: number, high: number): number[] {
  const values = [centre];
  for (let i = 0; i < 500; i++) values.push(low, high);
  return values;
}

/** Log relative error: the number of correct significant digits (McCullough 1998's LRE). */
function lre(estimate: number, certified: number): number {
  return -Math.log10(Math.abs(estimate - certified) / Math.abs(certified));
}

describe('mean and SD against the NIST StRD NumAcc data sets', () => {
  const sets = [
    // name, data, certified mean, certified SD, correct digits required of the mean and of the SD
    ['NumAcc1', [10000001, 10000003, 10000002], 10000002, 1, 15, 15],
    ['NumAcc2', numAcc(1.2, 1.1, 1.3), 1.2, 0.1, 15, 13],
    ['NumAcc3', numAcc(1000000.2, 1000000.1, 1000000.3), 1000000.2, 0.1, 15, 9],
    ['NumAcc4', numAcc(10000000.2, 10000000.1, 10000000.3), 10000000.2, 0.1, 15, 8],
  ] as const;
  for (const [name, data, mean, sd, meanDigits, sdDigits] of sets) {
    it(`gives ${name}'s certified mean and SD to ${meanDigits} and ${sdDigits} digits`, () => {
      const m = meanOf(data);
      expect(m === mean || lre(m, mean) >= meanDigits, `mean ${m}`).toBe(true);
      const s = sampleSd(data);
      expect(s === sd || lre(s, sd) >= sdDigits, `sd ${s}, ${lre(s, sd).toFixed(1)} digits`).toBe(true);
    });
  }

  it('is a check that can fail: the textbook one-pass formula loses NumAcc4\'s SD', () => {
    const data = numAcc(10000000.2, 10000000.1, 10000000.3);
    let sum = 0;
    let squares = 0;
    for (const x of data) {
      sum += x;
      squares += x * x;
    }
    const onePass = Math.sqrt(Math.max(0, (squares - (sum * sum) / data.length) / (data.length - 1)));
    expect(Number.isNaN(onePass) || lre(onePass, 0.1) < 8).toBe(true);
  });
});

describe('the t distribution', () => {
  // NIST/SEMATECH e-Handbook §1.3.6.7.2: upper critical values t(ν, α), P(T > t) = α.
  const table: readonly (readonly [df: number, a10: number, a05: number, a025: number, a01: number, a005: number])[] = [
    [1, 3.078, 6.314, 12.706, 31.821, 63.657],
    [2, 1.886, 2.92, 4.303, 6.965, 9.925],
    [3, 1.638, 2.353, 3.182, 4.541, 5.841],
    [4, 1.533, 2.132, 2.776, 3.747, 4.604],
    [5, 1.476, 2.015, 2.571, 3.365, 4.032],
    [9, 1.383, 1.833, 2.262, 2.821, 3.25],
    [10, 1.372, 1.812, 2.228, 2.764, 3.169],
    [15, 1.341, 1.753, 2.131, 2.602, 2.947],
    [20, 1.325, 1.725, 2.086, 2.528, 2.845],
    [30, 1.31, 1.697, 2.042, 2.457, 2.75],
    [60, 1.296, 1.671, 2.0, 2.39, 2.66],
    [100, 1.29, 1.66, 1.984, 2.364, 2.626],
  ];
  it('has the published critical values, to the table\'s 3 decimals', () => {
    for (const [df, ...row] of table) {
      [0.1, 0.05, 0.025, 0.01, 0.005].forEach((alpha, k) => {
        expect(Math.abs(tCritical(df, 1 - 2 * alpha) - (row[k] as number)), `df ${df}, α ${alpha}`).toBeLessThanOrEqual(0.0005 + 1e-12);
      });
    }
  });

  it('agrees with jStat on quantiles and two-sided p-values over degrees of freedom 1–200', () => {
    for (const df of [1, 2, 3, 4, 5, 7, 9, 12, 19, 29, 49, 99, 199]) {
      for (const level of [0.5, 0.8, 0.9, 0.95, 0.99, 0.999]) {
        const ours = tCritical(df, level);
        const theirs = jStat.studentt.inv(1 - (1 - level) / 2, df);
        expect(Math.abs(ours - theirs) / theirs, `df ${df}, level ${level}`).toBeLessThan(1e-6);
      }
      for (const t of [0, 0.3, 1, 2.5, 4, 8]) {
        const ours = tTwoSidedP(t, df);
        const theirs = 2 * (1 - jStat.studentt.cdf(Math.abs(t), df));
        expect(Math.abs(ours - theirs), `df ${df}, t ${t}`).toBeLessThan(1e-7);
        expect(tTwoSidedP(-t, df)).toBe(ours);
      }
    }
  });
});

describe('groupFigures', () => {
  it('gives no SD or interval for one subject, nothing for none, and leaves out values that are not finite', () => {
    expect(groupFigures([])).toEqual({ n: 0, mean: null, sd: null, ci95Low: null, ci95High: null });
    expect(groupFigures([2.5, Number.NaN])).toEqual({ n: 1, mean: 2.5, sd: null, ci95Low: null, ci95High: null });
  });

  it('puts the 95 % interval at mean ± t(0.975, n − 1) · SD / √n (two subjects: 12.706, the table above)', () => {
    const g = groupFigures([2, 4]);
    expect(g.mean).toBe(3);
    expect(g.sd).toBeCloseTo(Math.SQRT2, 14);
    expect(g.ci95Low).toBeCloseTo(3 - 12.7062 * 1, 3);
    expect(g.ci95High).toBeCloseTo(3 + 12.7062 * 1, 3);
  });
});

describe('pairedTTest on Student\'s sleep data', () => {
  // Hours of sleep gained with each of two drugs by the same ten patients (Cushny & Peebles 1905, as
  // tabled by Student 1908): drug A, then drug B.
  const drugA = [0.7, -1.6, -0.2, -1.2, -0.1, 3.4, 3.7, 0.8, 0.0, 2.0];
  const drugB = [1.9, 0.8, 1.1, 0.1, -0.1, 4.4, 5.5, 1.6, 4.6, 3.4];
  const test = pairedTTest(drugA, drugB);

  it('gives the worked example\'s mean difference, SD, t and p', () => {
    expect(test.nPairs).toBe(10);
    // Mean difference 1.58 h (Student 1908; Fisher 1925 §24), SD of the differences 1.23, t = 4.06 with
    // 9 degrees of freedom (Fisher 1925 §24, from memory), two-sided p = 0.0028 (from memory of the same
    // example as worked in R's t.test documentation: t = 4.0621, p-value = 0.002833).
    expect(test.meanDiff).toBeCloseTo(1.58, 12);
    expect(test.dz).toBeCloseTo(1.58 / 1.22999, 4);
    expect(test.t).toBeCloseTo(4.0621, 4);
    expect(test.p).toBeCloseTo(0.002833, 6);
    // The 95 % interval of the mean difference, 0.700 to 2.460 h (from memory, the same R example:
    // 0.7001142 to 2.4598858); and as the definition gives it with jStat's quantile.
    expect(test.ci95Low).toBeCloseTo(0.7001142, 6);
    expect(test.ci95High).toBeCloseTo(2.4598858, 6);
    const half = jStat.studentt.inv(0.975, 9) * (1.2299955 / Math.sqrt(10));
    expect(test.ci95Low).toBeCloseTo(1.58 - half, 5);
  });

  it('gives the same test with the conditions swapped, the signs turned', () => {
    const back = pairedTTest(drugB, drugA);
    expect(back.meanDiff).toBeCloseTo(-1.58, 12);
    expect(back.t).toBeCloseTo(-(test.t as number), 12);
    expect(back.p).toBeCloseTo(test.p as number, 15);
    expect(back.ci95Low).toBeCloseTo(-(test.ci95High as number), 12);
  });

  it('leaves t, p and dz empty when the differences do not vary or there is one pair, and skips pairs with a missing value', () => {
    expect(pairedTTest([1, 2, 3], [2, 3, 4])).toMatchObject({ nPairs: 3, meanDiff: 1, t: null, p: null, dz: null });
    expect(pairedTTest([1], [3])).toEqual({ nPairs: 1, meanDiff: 2, ci95Low: null, ci95High: null, t: null, p: null, dz: null });
    expect(pairedTTest([1, Number.NaN, 2, 5], [2, 7, 4, 5]).nPairs).toBe(3);
  });
});
