import fc from 'fast-check';
import { mkdtemp, readFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { decimalsFor, OUTPUT_DECIMALS, roundFigures, roundTo } from '../../src/output/output-precision.ts';
import { STRIDE_COLUMNS } from '../../src/output/strides-csv.ts';
import { runLengthwise } from '../helpers/command-child.ts';
import { parseCsv } from '../study/generated-trials.ts';

const ROOT = join(import.meta.dirname, '..', '..');

/** Decimals in the shortest text of a number (ECMA-262 Number::toString): 1.126 → 3; 2e-7 → 7. */
function decimalsOf(x: number): number {
  const text = String(x);
  const exp = /e([+-]\d+)$/.exec(text);
  const mantissa = exp === null ? text : text.slice(0, exp.index);
  const fraction = mantissa.split('.')[1]?.length ?? 0;
  return Math.max(0, fraction - (exp === null ? 0 : Number(exp[1])));
}

describe('roundTo', () => {
  it('rounds as the language\'s own exact decimal conversion does (ECMA-262 Number.prototype.toFixed)', () => {
    // Outside reference: toFixed rounds the double's exact binary value to the nearest decimal, ties away from zero.
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 6 }), (x, d) => {
        const expected = Number(x.toFixed(d));
        expect(roundTo(x, d)).toBe(expected === 0 ? 0 : expected);
      }),
      { numRuns: 20_000 },
    );
  });

  it('agrees with toFixed on exact ties and on values whose scaled product rounds across a half', () => {
    for (const [x, d] of [[0.5, 0], [-0.5, 0], [2.5, 0], [1.005, 2], [1.255, 2], [0.0000005, 6], [-0.0000005, 6], [1.0000005, 6], [8.345, 2], [2 ** 31 / 1e6 + 0.0000005, 6]] as const) {
      const expected = Number(x.toFixed(d));
      expect(roundTo(x, d), `${x} to ${d}`).toBe(expected === 0 ? 0 : expected);
    }
  });

  it('writes at most the given decimals, in the shortest text that reads back (ECMA-262 Number::toString)', () => {
    fc.assert(
      fc.property(fc.double({ min: -1e5, max: 1e5, noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 6 }), (x, d) => {
        const r = roundTo(x, d);
        expect(decimalsOf(r)).toBeLessThanOrEqual(d);
        expect(Number(String(r))).toBe(r);
        expect(Math.abs(r - x)).toBeLessThanOrEqual(0.5 * 10 ** -d * (1 + 1e-9) + Math.abs(x) * Number.EPSILON);
      }),
      { numRuns: 20_000 },
    );
  });

  it('takes the float noise off sums and differences of recorded times', () => {
    expect(1.467 - 0.341).toBe(1.1260000000000001);
    expect(roundTo(1.467 - 0.341, OUTPUT_DECIMALS.s)).toBe(1.126);
    expect(String(roundTo(0.1 + 0.2, 6))).toBe('0.3');
    expect(roundTo(0.5914742451154531, OUTPUT_DECIMALS.other)).toBe(0.591474);
  });

  it('leaves whole numbers, NaN and infinities as they are, and never writes -0', () => {
    for (const x of [0, 17_500, -3, Number.NaN, Infinity, -Infinity]) expect(Object.is(roundTo(x, 4), x)).toBe(true);
    expect(Object.is(roundTo(-0.00001, 4), 0)).toBe(true);
  });
});

describe('decimalsFor', () => {
  it('reads the unit from the name', () => {
    expect(decimalsFor('sl_mean_um')).toBe(4);
    expect(decimalsFor('stance_sl_p5_um')).toBe(4);
    expect(decimalsFor('reference_fascicle_mm')).toBe(4);
    expect(decimalsFor('velocity_max_mm_s')).toBe(3);
    expect(decimalsFor('swing_velocity_min_mm_s')).toBe(3);
    expect(decimalsFor('duration_s')).toBe(6);
    expect(decimalsFor('seconds')).toBe(6);
    expect(decimalsFor('sarcomeres_in_series')).toBe(2);
    for (const key of ['plateau', 'plateau_fraction', 'gap_fraction', 'force_mean', 'sarcomeres_in_series_relative_sd', 'descending_probability_p95']) {
      expect(decimalsFor(key), key).toBe(6);
    }
  });
});

describe('roundFigures', () => {
  it('rounds every number of a tree by its key, an array\'s items by the array\'s key, and leaves the tree given unchanged', () => {
    const tree = { start_s: 0.1 + 0.2, cycle: { sl_mean_um: [2.123456, 2.98766] }, region_fraction: { plateau: 1 / 3 }, pair: [[1 / 3, 2 / 3]], name: 'calf', none: null };
    const copy = JSON.parse(JSON.stringify(tree)) as typeof tree;
    expect(roundFigures(tree)).toEqual({ start_s: 0.3, cycle: { sl_mean_um: [2.1235, 2.9877] }, region_fraction: { plateau: 0.333333 }, pair: [[0.333333, 0.666667]], name: 'calf', none: null });
    expect(tree).toEqual(copy);
  });

  it('keeps a key of any text as the tree\'s own, __proto__ too', () => {
    const tree = JSON.parse('{"muscles": {"__proto__": {"sl_mean_um": 2.123456}}}') as { muscles: Record<string, { sl_mean_um: number }> };
    const rounded = roundFigures(tree);
    expect(Object.keys(rounded.muscles)).toEqual(['__proto__']);
    expect(Object.getOwnPropertyDescriptor(rounded.muscles, '__proto__')?.value).toEqual({ sl_mean_um: 2.1235 });
  });
});

describe('the outputs of a replay', () => {
  it('write every number of the summary and the stride table with at most its unit\'s decimals', { timeout: 60_000 }, async () => {
    const dir = await mkdtemp(join(tmpdir(), 'lengthwise-precision-'));
    const summary = join(dir, 's.json');
    const strides = join(dir, 's.csv');
    const ran = await runLengthwise(['replay', join(ROOT, 'replays', 'demo-walk.ndjson'), '--speed', 'max', '--plain', '--summary', summary, '--strides', strides], { env: process.env });
    expect(ran.code, ran.stderr).toBe(0);
    // Every number as written, with the key it stands under (an array's items under the array's key).
    const numbers: [string, string][] = [];
    const keyed = /"([^"]+)":\s*(\[[^\]{]*\]|-?\d[\d.eE+-]*)/g;
    const text = await readFile(summary, 'utf8');
    for (const m of text.matchAll(keyed)) {
      for (const n of (m[2] ?? '').match(/-?\d[\d.eE+-]*/g) ?? []) numbers.push([m[1] ?? '', n]);
    }
    expect(numbers.length).toBeGreaterThan(5000);
    for (const [key, n] of numbers) expect(decimalsOf(Number(n)), `${key}: ${n}`).toBeLessThanOrEqual(decimalsFor(key));
    const [header, ...rows] = parseCsv(await readFile(strides, 'utf8'));
    expect(header).toEqual([...STRIDE_COLUMNS]);
    for (const row of rows) {
      row.forEach((cell, i) => {
        if (/^-?\d/.test(cell)) expect(decimalsOf(Number(cell)), `${STRIDE_COLUMNS[i]}: ${cell}`).toBeLessThanOrEqual(decimalsFor(STRIDE_COLUMNS[i] ?? ''));
      });
    }
  });
});
