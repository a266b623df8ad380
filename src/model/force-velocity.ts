/**
 * Force–velocity and pennation factors, to multiply the force–length value by. Velocity is normalized:
 * vNorm = fibre velocity / Vmax, positive = lengthening (the sign of Sample.velocityMmS).
 */

/** Hill's a/F0 (= b/Vmax): curvature of the shortening branch (Hill 1938, Proc R Soc Lond B 126:136–195; 0.25 is the usual value, from memory). */
export const DEFAULT_HILL_K = 0.25;
/** Maximum shortening velocity in optimal lengths per second (Thelen 2003, J Biomech Eng 125:70–77: 10 L0/s for young adults). */
export const DEFAULT_VMAX_L0_PER_S = 10;
/**
 * Force plateau of the lengthening branch, × F0: 1.5, the eccentric enhancement of Geyer & Herr 2010
 * (IEEE Trans Neural Syst Rehabil Eng 18:263–273 — from memory; isolated muscle gives 1.5–1.8, Katz 1939).
 * In vivo, voluntary human lengthening force rises far less above isometric (Westing, Seger &
 * Thorstensson 1990, Acta Physiol Scand 140:17–22 — from memory): pass a smaller plateau for such use.
 */
export const DEFAULT_LENGTHENING_PLATEAU = 1.5;
/**
 * Slope of the lengthening branch at v = 0 relative to the shortening branch's slope there: 2. A modelling
 * convention of Hill-type muscle models (e.g. van Soest & Bobbert 1993, Biol Cybern 69:195–204 — from
 * memory), not a measured value: Katz 1939 (J Physiol 96:45–64) found the lengthening branch steeper than
 * the shortening one (from memory), which the convention takes up without measuring this ratio.
 */
export const DEFAULT_LENGTHENING_SLOPE_RATIO = 2;

export interface ForceVelocityOptions {
  /** a/F0. @default 0.25 */
  readonly k?: number;
  /** Force plateau for fast lengthening, × F0. @default 1.5 */
  readonly lengtheningPlateau?: number;
  /** Lengthening slope at zero over shortening slope at zero. @default 2 */
  readonly lengtheningSlopeRatio?: number;
}

/**
 * Relative force at a normalized velocity. Shortening (vNorm < 0, speed u = −vNorm): Hill's hyperbola
 * (F + a)(v + b) = (F0 + a)b in normalized form, F/F0 = (1 − u) / (1 + u/k), zero at u ≥ 1 (Hill 1938,
 * Proc R Soc Lond B 126:136–195); F(u = 0.5) = 1/6 for k = 0.25. Lengthening (vNorm > 0): a hyperbola
 * rising from 1 towards the plateau, F/F0 = 1 + (P − 1)·v / (v + c), with c set so the slope at 0 is
 * `lengtheningSlopeRatio` times the shortening slope (1 + 1/k). NaN gives NaN; allocation-free.
 */
export function forceVelocityFactor(vNorm: number, options: ForceVelocityOptions = {}): number {
  if (Number.isNaN(vNorm)) return Number.NaN;
  const k = options.k ?? DEFAULT_HILL_K;
  if (vNorm <= 0) {
    const u = -vNorm;
    if (u >= 1) return 0;
    return (1 - u) / (1 + u / k);
  }
  const plateau = options.lengtheningPlateau ?? DEFAULT_LENGTHENING_PLATEAU;
  const ratio = options.lengtheningSlopeRatio ?? DEFAULT_LENGTHENING_SLOPE_RATIO;
  const c = (plateau - 1) / (ratio * (1 + 1 / k));
  return 1 + ((plateau - 1) * vNorm) / (vNorm + c);
}

/**
 * Normalized velocity from a fascicle velocity: (mm/s ÷ optimal fascicle length in mm) ÷ Vmax (L0/s).
 * The optimal fascicle length is sarcomeres in series × plateau middle (µm) / 1000.
 */
export function normalizedVelocity(velocityMmS: number, optimalFascicleMm: number, vmaxL0PerS: number = DEFAULT_VMAX_L0_PER_S): number {
  return velocityMmS / optimalFascicleMm / vmaxL0PerS;
}

const DEG = Math.PI / 180;

/**
 * Share of fibre force along the line of action (the tendon): cos(pennation angle) (common practice, no
 * source; e.g. the pennation term of Hill-type muscle models). NaN or an angle outside 0–90° gives NaN.
 */
export function alongTendonFactor(pennationDeg: number): number {
  if (!(pennationDeg >= 0 && pennationDeg <= 90)) return Number.NaN;
  return Math.cos(pennationDeg * DEG);
}
