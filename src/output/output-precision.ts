/**
 * How many decimals each figure the tool writes carries (summary JSON, stride CSV, and through the
 * summary the study table and the report), said once. A figure is rounded once, when the output is
 * built, to the precision its unit has, chosen by the name of its key or column:
 *
 * | key ends with | unit | decimals | why |
 * |---|---|---|---|
 * | `_um` | µm | 4 | 0.1 nm: ten times finer than the histograms' 0.001 µm bins |
 * | `_mm` | mm | 4 | 0.1 µm: finer than any tracked fascicle length |
 * | `_mm_s` | mm/s | 3 | 1 µm/s |
 * | `_s` (and histogram `seconds`) | s | 6 | 1 µs: the finest clock a device mapping reads |
 * | `sarcomeres_in_series` | count | 2 | an estimated count (N = fascicle ÷ sarcomere length) |
 * | `p` (a study's comparisons) | probability | 6 significant digits | a p-value can lie far below 10⁻⁶, where 6 decimals would write 0 |
 * | anything else | fractions, probabilities, relative forces and SDs (0–1.5) | 6 | one part in a million |
 *
 * Whole numbers (counts, indices) are written as they are. The text of a rounded number is then the
 * shortest that reads back as it (ECMAScript Number::toString), so `1.1260000000000001` is written `1.126`.
 */

/** Decimals by unit; see the table above. */
export const OUTPUT_DECIMALS = { um: 4, mm: 4, mmPerS: 3, s: 6, sarcomereCount: 2, other: 6 } as const;

/** The decimals of the figure named `key` (a JSON key or a CSV column; for an array's items, the array's key). */
export function decimalsFor(key: string): number {
  if (key.endsWith('_mm_s')) return OUTPUT_DECIMALS.mmPerS;
  if (key.endsWith('_um')) return OUTPUT_DECIMALS.um;
  if (key.endsWith('_mm')) return OUTPUT_DECIMALS.mm;
  if (key.endsWith('_s') || key === 'seconds') return OUTPUT_DECIMALS.s;
  if (key === 'sarcomeres_in_series') return OUTPUT_DECIMALS.sarcomereCount;
  return OUTPUT_DECIMALS.other;
}

/** Beyond this, |x| × 10^decimals is no longer exact to a millionth, so the language's own conversion rounds. */
const EXACT_PRODUCT_LIMIT = 2 ** 31;
const SCALES = [1, 10, 100, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9] as const;
/** How close to a half the scaled value may be before the product's own rounding could decide wrongly. */
const TIE_WINDOW = 1e-6;

/**
 * `x` rounded to `decimals` decimals (half away from zero): the double nearest to that decimal, so its
 * shortest text has at most `decimals` decimals. The same as `Number(x.toFixed(decimals))`, faster where
 * the scaled value is exact enough; near a tie, and for large values, it is that. Not finite: unchanged.
 */
export function roundTo(x: number, decimals: number): number {
  if (x === 0) return 0;
  if (!Number.isFinite(x) || Number.isInteger(x)) return x;
  const scale = SCALES[decimals] ?? 10 ** decimals;
  const y = Math.abs(x) * scale;
  if (y >= EXACT_PRODUCT_LIMIT || Math.abs(y - Math.floor(y) - 0.5) < TIE_WINDOW) {
    const r = Number(x.toFixed(decimals));
    return r === 0 ? 0 : r;
  }
  const r = Math.round(y) / scale;
  return r === 0 ? 0 : x < 0 ? -r : r;
}

/** A p-value as written: 6 significant digits (see the table above); not finite: unchanged. */
export function roundPValue(p: number): number {
  return Number.isFinite(p) && p !== 0 ? Number(p.toPrecision(6)) : p;
}

/** Decimals by key, found once per key name (a summary has a few dozen names and many thousand numbers). */
const decimalsByKey = new Map<string, number>();

function decimalsOfKey(key: string): number {
  let d = decimalsByKey.get(key);
  if (d === undefined) {
    d = decimalsFor(key);
    if (decimalsByKey.size < 4096) decimalsByKey.set(key, d);
  }
  return d;
}

function roundTree(tree: unknown, decimals: number): unknown {
  if (typeof tree === 'number') return roundTo(tree, decimals);
  if (typeof tree !== 'object' || tree === null) return tree;
  if (Array.isArray(tree)) {
    const out = new Array<unknown>(tree.length);
    for (let i = 0; i < tree.length; i++) out[i] = roundTree(tree[i], decimals);
    return out;
  }
  const out: Record<string, unknown> = {};
  for (const k of Object.keys(tree)) {
    const v = roundTree((tree as Record<string, unknown>)[k], decimalsOfKey(k));
    // A key such as __proto__ stays the object's own.
    if (k === '__proto__') Object.defineProperty(out, k, { value: v, enumerable: true, writable: true, configurable: true });
    else out[k] = v;
  }
  return out;
}

/**
 * A copy of a tree of plain data (objects, arrays, numbers, text) with every number rounded as its key
 * says; an array's items take the array's key. Keys are copied as the tree's own (any text, `__proto__` too).
 */
export function roundFigures<T>(tree: T, key = ''): T {
  return roundTree(tree, decimalsOfKey(key)) as T;
}
