/**
 * Smooth Hill-type active force–length curves in normalized length (L/L0, L0 = the plateau middle of the
 * geometric curve). They give the force only: regions always come from the geometry.
 */

/** Width parameter γ of the Gaussian curve (Thelen 2003, J Biomech Eng 125:70–77). */
export const THELEN_GAMMA = 0.45;

/** Thelen 2003 (J Biomech Eng 125:70–77): f(l) = exp(−(l − 1)² / γ), γ = 0.45; f(0.5) = f(1.5) ≈ 0.5738. */
export function gaussianForceNorm(lengthNorm: number, gamma: number = THELEN_GAMMA): number {
  const d = lengthNorm - 1;
  return Math.exp(-(d * d) / gamma);
}

/**
 * Parameters (b1, b2, b3, b4) of the three Gaussians of De Groote, Kinney, Rao & Fregly 2016 (Ann Biomed
 * Eng 44:2922–2936, appendix table). The third is given in closed form: b1 = 0.1, b2 = 1, b3 = 0.5·√0.5 =
 * 0.353553…, b4 = 0 (so its width term squared is 1/8). The eleven decimal values of the first two are
 * from memory: the paper's table was not at hand to check them digit by digit.
 */
export const DE_GROOTE_2016 = [
  [0.814483478343008, 1.05503342897057, 0.162384573599574, 0.0633034484654646],
  [0.433004984392647, 0.71677541339776, -0.0299471169706956, 0.200356847296188],
  [0.1, 1.0, 0.5 * Math.sqrt(0.5), 0.0],
] as const;

/**
 * De Groote et al. 2016 (Ann Biomed Eng 44:2922–2936): f(l) = Σᵢ b1ᵢ exp(−½ (l − b2ᵢ)² / (b3ᵢ + b4ᵢ l)²),
 * the square taken over the whole width term. Its peak is a hair above 1 near l = 1, so it is capped at 1
 * to stay a relative force.
 */
export function threeGaussianForceNorm(lengthNorm: number): number {
  let sum = 0;
  for (const [b1, b2, b3, b4] of DE_GROOTE_2016) {
    const width = b3 + b4 * lengthNorm;
    const d = lengthNorm - b2;
    sum += b1 * Math.exp((-0.5 * d * d) / (width * width));
  }
  return sum > 1 ? 1 : sum;
}
