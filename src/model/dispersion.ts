/**
 * Sarcomere-length spread between the fibres of a muscle: the fibres do not all share the estimated length.
 * Fibres in parallel each add their force, so if their lengths spread normally around the estimate with SD σ
 * (0.21 ± 0.09 µm between fibres of the human vastus lateralis: Chen, Sanchez, Schnitzer & Delp 2016,
 * J Biomech 49:2989–2994, abstract), the muscle's relative force is the curve convolved with that normal
 * density. (Within one fibre, sarcomeres in series spread too — SD 0.20 µm in a human forearm muscle,
 * Cromie, Sanchez, Schnitzer & Delp 2013, Muscle Nerve 48:286–292 — but they carry one and the same force,
 * so that spread is not an average of forces and is not modelled here.) Computed once into a lookup table
 * at model creation, so the per-sample cost is one interpolation.
 */
import { normalCdf, normalPdf } from './normal.ts';
import type { ForceLengthCurve } from './geometry.ts';

/** A function sampled on an even grid; outside the grid the original function is used. */
export interface LookupTable {
  readonly loUm: number;
  readonly stepUm: number;
  readonly values: Float64Array;
}

/** Kernel half-width in SDs: the normal mass beyond 6 SD is below 2e-9. */
const KERNEL_SDS = 6;

/** Grid step for a given SD: fine enough that interpolation error stays near 1e-6 of full force. */
export function tableStepUm(sdUm: number): number {
  return Math.min(0.001, sdUm / 10);
}

/**
 * Numerical convolution of `force` with a normal density of SD `sdUm`, tabulated on [loUm, hiUm]:
 * value(x) = Σₖ wₖ force(x + k·h), wₖ ∝ φ(k·h/σ), normalized so Σ wₖ = 1 (a constant stays constant and
 * a straight line stays the same straight line).
 */
export function convolvedTable(force: (slUm: number) => number, loUm: number, hiUm: number, sdUm: number): LookupTable {
  const stepUm = tableStepUm(sdUm);
  const k = Math.ceil((KERNEL_SDS * sdUm) / stepUm);
  const weights = new Float64Array(2 * k + 1);
  let total = 0;
  for (let j = -k; j <= k; j++) {
    const w = normalPdf((j * stepUm) / sdUm);
    weights[j + k] = w;
    total += w;
  }
  for (let j = 0; j < weights.length; j++) weights[j] = (weights[j] as number) / total;

  const n = Math.max(2, Math.ceil((hiUm - loUm) / stepUm) + 1);
  // The base function on the table grid extended by the kernel's half-width each side.
  const base = new Float64Array(n + 2 * k);
  for (let i = 0; i < base.length; i++) base[i] = force(loUm + (i - k) * stepUm);
  const values = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sum = 0;
    for (let j = 0; j < weights.length; j++) sum += (weights[j] as number) * (base[i + j] as number);
    values[i] = sum;
  }
  return { loUm, stepUm, values };
}

/** Linear interpolation in a table; NaN outside it (the caller falls back to the original function). */
export function lookup(table: LookupTable, slUm: number): number {
  const pos = (slUm - table.loUm) / table.stepUm;
  const i = Math.floor(pos);
  const values = table.values;
  if (!(i >= 0 && i < values.length - 1)) {
    return i === values.length - 1 && pos === i ? (values[i] as number) : Number.NaN;
  }
  const a = values[i] as number;
  const b = values[i + 1] as number;
  return a + (b - a) * (pos - i);
}

/**
 * The same convolution in closed form for the piecewise-linear geometric curve: on each straight piece
 * y = m·s + c over [a, b], E[y] = (m·x + c)(Φ(β) − Φ(α)) + m·σ(φ(α) − φ(β)) with α = (a − x)/σ,
 * β = (b − x)/σ (a standard property of the normal distribution; common practice, no source). Used to
 * check the numerical table; slower (it evaluates Φ per piece), so not for per-sample use.
 */
export function dispersedGeometricForceExact(c: ForceLengthCurve, slUm: number, sdUm: number): number {
  const pts: ReadonlyArray<readonly [number, number]> = [
    [c.steepZeroUm, 0],
    [c.steepBreakUm, c.steepBreakForce],
    [c.plateauStartUm, 1],
    [c.plateauEndUm, 1],
    [c.descendingZeroUm, 0],
  ];
  let sum = 0;
  for (let i = 0; i + 1 < pts.length; i++) {
    const [a, fa] = pts[i] as readonly [number, number];
    const [b, fb] = pts[i + 1] as readonly [number, number];
    const m = (fb - fa) / (b - a);
    const alpha = (a - slUm) / sdUm;
    const beta = (b - slUm) / sdUm;
    const atX = fa + m * (slUm - a);
    sum += atX * (normalCdf(beta) - normalCdf(alpha)) + m * sdUm * (normalPdf(alpha) - normalPdf(beta));
  }
  return sum;
}
