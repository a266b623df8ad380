/**
 * The sarcomere force–length relation from filament geometry: active force follows the overlap of thin
 * (actin) and thick (myosin) filaments (Gordon, Huxley & Julian 1966, J Physiol 184:170–192).
 *
 * Every breakpoint but one is computed from filament lengths, so a user's own filament lengths give
 * their own curve. The exception is where the steep ascending limb reaches zero force: geometry alone
 * does not give it (it reflects thick filaments pressed against the Z-discs), so it is an empirical value.
 */
import type { RegionKey } from './regions.ts';

/** Filament lengths of one species or muscle, all in µm, plus the two empirical values of the steep limb. */
export interface FilamentGeometry {
  /** Thick (myosin) filament length. */
  readonly thickUm: number;
  /** One thin (actin) filament, from the Z-disc edge to its tip. */
  readonly thinUm: number;
  /** The bare zone at the thick filament's middle, free of myosin heads. */
  readonly bareZoneUm: number;
  /** Z-disc width. */
  readonly zDiscUm: number;
  /**
   * Sarcomere length where the steep ascending limb reaches zero force (extrapolated). Not a filament
   * length: an empirical value of the preset (1.27 µm in Gordon, Huxley & Julian 1966 and in the human
   * curve of Rassier, MacIntosh & Herzog 1999, J Appl Physiol 86:1445–1457, Fig. 3).
   */
  readonly steepZeroUm: number;
  /** Relative force at the break between the steep and the shallow ascending limb (read off a published curve). */
  readonly steepBreakForce: number;
}

/** Breakpoints of the piecewise-linear curve, µm, ascending order. */
export interface ForceLengthCurve {
  readonly geometry: FilamentGeometry;
  /** Force is zero at and below this length. */
  readonly steepZeroUm: number;
  /** Thick filaments reach the Z-discs (thick + Z-disc): the steep limb lies below this length. */
  readonly steepBreakUm: number;
  /** Thin filaments meet at the sarcomere's centre (2 × thin + Z-disc): the shallow limb lies below this length. */
  readonly plateauStartUm: number;
  /** Thin filament tips reach the bare zone's edge (2 × thin + Z-disc + bare zone): the descending limb begins above. */
  readonly plateauEndUm: number;
  /** Thin filaments leave the thick filaments (thick + 2 × thin + Z-disc): no active force at and above this length. */
  readonly descendingZeroUm: number;
  readonly steepBreakForce: number;
}

/**
 * Breakpoints computed from filament lengths (Gordon, Huxley & Julian 1966, J Physiol 184:170–192, Fig. 13:
 * zero overlap at thick + thin span, plateau end at thin span + bare zone, plateau start at the thin span,
 * thick filaments at the Z-discs at thick + Z-disc).
 */
export function curveFromGeometry(g: FilamentGeometry): ForceLengthCurve {
  const thinSpanUm = 2 * g.thinUm + g.zDiscUm;
  return {
    geometry: g,
    steepZeroUm: g.steepZeroUm,
    steepBreakUm: toPicometre(g.thickUm + g.zDiscUm),
    plateauStartUm: toPicometre(thinSpanUm),
    plateauEndUm: toPicometre(thinSpanUm + g.bareZoneUm),
    descendingZeroUm: toPicometre(g.thickUm + thinSpanUm),
    steepBreakForce: g.steepBreakForce,
  };
}

/** Rounds a sum of lengths to 1e-6 µm, so 2.05 + 0.15 is 2.2 and a length typed as 2.2 lands on the breakpoint. */
function toPicometre(um: number): number {
  return Math.round(um * 1e6) / 1e6;
}

/** A preset with some of its values replaced (a muscle's own filament lengths, from a calibration). */
export function withFilaments(base: FilamentGeometry, overrides: Partial<FilamentGeometry> = {}): FilamentGeometry {
  return { ...base, ...overrides };
}

/** Why a geometry cannot make a curve; empty when it can. Each message says what is accepted. */
export function geometryProblems(g: FilamentGeometry): string[] {
  const problems: string[] = [];
  const check = (name: string, value: number, lo: number, hi: number, unit = ' µm'): void => {
    if (!Number.isFinite(value) || value < lo || value > hi) {
      problems.push(`${name} is ${String(value)}; accepted: a number from ${lo} to ${hi}${unit}`);
    }
  };
  check('thick filament length', g.thickUm, 0.5, 3);
  check('thin filament length', g.thinUm, 0.3, 3);
  check('bare zone', g.bareZoneUm, 0, 0.6);
  check('Z-disc width', g.zDiscUm, 0, 0.3);
  check('steep-limb zero length', g.steepZeroUm, 0.3, 3);
  check('force at the steep/shallow break', g.steepBreakForce, 0, 1, '');
  if (problems.length > 0) return problems;
  const c = curveFromGeometry(g);
  if (!(c.steepZeroUm < c.steepBreakUm)) {
    problems.push(
      `the steep limb's zero (${fmt(c.steepZeroUm)} µm) must lie below thick + Z-disc (${fmt(c.steepBreakUm)} µm); lower steep_zero_um or lengthen the thick filament`,
    );
  }
  if (!(c.steepBreakUm < c.plateauStartUm)) {
    problems.push(
      `thick + Z-disc (${fmt(c.steepBreakUm)} µm) must be shorter than 2 × thin + Z-disc (${fmt(c.plateauStartUm)} µm) for a shallow ascending limb; check thick_um and thin_um`,
    );
  }
  return problems;
}

function fmt(x: number): string {
  return x.toFixed(3);
}

/**
 * Width (µm) of the shallow ascending limb: from 2 × thin + Z-disc (thin filaments meet at the centre) down to
 * thick + Z-disc (thick filaments reach the Z-discs). Over it the thin filaments overlap each other, by up to
 * 2 × thin − thick at its short end: 0.40 µm in frog, 0.94 µm in human fibres.
 */
export function shallowLimbWidthUm(g: FilamentGeometry): number {
  return 2 * g.thinUm - g.thickUm;
}

/**
 * The force at the steep/shallow break of a geometry with no measured value, derived from a geometry whose
 * value is measured, under one written assumption: every µm of thin-filament double overlap costs the same
 * share of peak force, so the shallow limb has the same slope in both. Then
 * f = 1 − (1 − f_ref) × width / width_ref (widths from shallowLimbWidthUm). Common practice, no source: our
 * own derivation. NaN when the reference has no shallow limb.
 */
export function steepBreakForceFromDoubleOverlap(g: FilamentGeometry, reference: FilamentGeometry): number {
  const ref = shallowLimbWidthUm(reference);
  if (!(ref > 0)) return Number.NaN;
  return 1 - ((1 - reference.steepBreakForce) * shallowLimbWidthUm(g)) / ref;
}

/** Middle of the plateau (µm): the length of peak active force, L0 of the normalized curves. */
export function plateauMiddleUm(c: ForceLengthCurve): number {
  return (c.plateauStartUm + c.plateauEndUm) / 2;
}

/** The five breakpoints (µm, ascending), with the force at each; for tables and plots. */
export function breakpoints(c: ForceLengthCurve): ReadonlyArray<{ readonly name: string; readonly slUm: number; readonly force: number }> {
  return [
    { name: 'steep_zero', slUm: c.steepZeroUm, force: 0 },
    { name: 'steep_break', slUm: c.steepBreakUm, force: c.steepBreakForce },
    { name: 'plateau_start', slUm: c.plateauStartUm, force: 1 },
    { name: 'plateau_end', slUm: c.plateauEndUm, force: 1 },
    { name: 'descending_zero', slUm: c.descendingZeroUm, force: 0 },
  ];
}

/**
 * Relative active force (0–1) of the piecewise-linear geometric curve at a sarcomere length
 * (Gordon, Huxley & Julian 1966, J Physiol 184:170–192, Fig. 12). NaN gives NaN.
 */
export function geometricForce(c: ForceLengthCurve, sarcomereUm: number): number {
  if (Number.isNaN(sarcomereUm)) return Number.NaN;
  if (sarcomereUm <= c.steepZeroUm || sarcomereUm >= c.descendingZeroUm) return 0;
  if (sarcomereUm < c.steepBreakUm) {
    return (c.steepBreakForce * (sarcomereUm - c.steepZeroUm)) / (c.steepBreakUm - c.steepZeroUm);
  }
  if (sarcomereUm < c.plateauStartUm) {
    return (
      c.steepBreakForce +
      ((1 - c.steepBreakForce) * (sarcomereUm - c.steepBreakUm)) / (c.plateauStartUm - c.steepBreakUm)
    );
  }
  if (sarcomereUm <= c.plateauEndUm) return 1;
  return (c.descendingZeroUm - sarcomereUm) / (c.descendingZeroUm - c.plateauEndUm);
}

/**
 * Region of the geometric curve at a sarcomere length. Regions always come from the geometry, whatever
 * curve gives the force. Pass finite lengths (a NaN falls through to 'no_overlap').
 */
export function regionAt(c: ForceLengthCurve, sarcomereUm: number): RegionKey {
  if (sarcomereUm <= c.steepZeroUm) return 'too_short';
  if (sarcomereUm < c.steepBreakUm) return 'steep_ascending';
  if (sarcomereUm < c.plateauStartUm) return 'shallow_ascending';
  if (sarcomereUm <= c.plateauEndUm) return 'plateau';
  if (sarcomereUm < c.descendingZeroUm) return 'descending';
  return 'no_overlap';
}

/**
 * Lower boundary (µm) of each region, in REGION_KEYS order; the region runs up to the next one's.
 * too_short starts at 0, so the six regions partition every positive length.
 */
export function regionLowerBoundsUm(c: ForceLengthCurve): readonly [number, number, number, number, number, number] {
  return [0, c.steepZeroUm, c.steepBreakUm, c.plateauStartUm, c.plateauEndUm, c.descendingZeroUm];
}
