/**
 * The power-normal distribution: X > 0 such that the Box-Cox transform of X is normal.
 */
import normal from "@stdlib/stats-base-dists-normal";
import { boxCoxOfLog } from "./box-cox";
import { assertFiniteNumber, assertOpenProbability, StatsInputError } from "./validate";

export interface PowerNormal {
  lambda: number;
  /** Mean of the Box-Cox transformed values. */
  mu: number;
  /** SD of the Box-Cox transformed values. */
  sigma: number;
}

/**
 * The transformed value of x (x ≥ 0, or +Infinity): ln x or (x^λ − 1)/λ, with the limits at 0
 * (−∞ for λ ≤ 0, −1/λ for λ > 0) and at +∞ (+∞ for λ ≥ 0, −1/λ for λ < 0).
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(1). Throws nothing.
 * @example powerNormalScale(0, 0.5) // −2
 */
export function powerNormalScale(x: number, lambda: number): number {
  if (x === 0) return lambda > 0 ? -1 / lambda : Number.NEGATIVE_INFINITY;
  if (x === Number.POSITIVE_INFINITY) return lambda < 0 ? -1 / lambda : Number.POSITIVE_INFINITY;
  return boxCoxOfLog(Math.log(x), lambda);
}

/**
 * Distribution function of the power-normal, P(X ≤ x) = Φ((g(x) − μ)/σ) with g the Box-Cox
 * transform. Like Arzideh et al., the small mass that the normal puts where no positive x maps
 * (below −1/λ for λ > 0, above it for λ < 0) is not renormalised.
 * @see Arzideh F et al. J Lab Med 2009;33:52–66 (the power-normal model of the non-diseased);
 *   Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(1). Throws StatsInputError for a negative x, σ ≤ 0 or non-finite parameters.
 * @example powerNormalCdf(Math.E, { lambda: 0, mu: 1, sigma: 1 }) // 0.5
 */
export function powerNormalCdf(x: number, d: PowerNormal): number {
  checkParameters(d);
  if (!(x >= 0)) throw new StatsInputError(`x must be ≥ 0 (got ${x})`);
  return normal.cdf(powerNormalScale(x, d.lambda), d.mu, d.sigma);
}

/**
 * Quantile of the power-normal: g⁻¹(μ + σ·Φ⁻¹(p)); null where 1 + λ·y ≤ 0 (no positive value
 * has that transform: the quantile lies in the mass that the model puts below 0).
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252 (the inverse transform).
 * Complexity O(1). Throws StatsInputError for p outside (0, 1), σ ≤ 0 or non-finite parameters.
 * @example powerNormalQuantile(0.5, { lambda: 0, mu: 1, sigma: 1 }) // e
 */
export function powerNormalQuantile(p: number, d: PowerNormal): number | null {
  checkParameters(d);
  assertOpenProbability(p);
  const y = d.mu + d.sigma * normal.quantile(p, 0, 1);
  if (d.lambda === 0) return Math.exp(y);
  const base = 1 + d.lambda * y;
  if (!(base > 0)) return null;
  return Math.exp(Math.log1p(d.lambda * y) / d.lambda);
}

/**
 * The parameters of c·X when X is power-normal: λ is unchanged, and the transformed scale
 * becomes g(c·x) = c^λ·g(x) + g(c), so μ′ = c^λ·μ + g(c), σ′ = c^λ·σ (for λ = 0: μ′ = μ + ln c).
 * The fit works on values divided by their median and reports in the laboratory's units.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252 (algebra of the transform).
 * Complexity O(1). Throws StatsInputError for c ≤ 0.
 * @example rescalePowerNormal({ lambda: 1, mu: 0, sigma: 0.1 }, 100) // { lambda: 1, mu: 99, sigma: 10 }
 */
export function rescalePowerNormal(d: PowerNormal, c: number): PowerNormal {
  if (!(c > 0) || !Number.isFinite(c)) throw new StatsInputError(`the scale must be a positive number (got ${c})`);
  if (d.lambda === 0) return { lambda: 0, mu: d.mu + Math.log(c), sigma: d.sigma };
  const cl = Math.exp(d.lambda * Math.log(c));
  return { lambda: d.lambda, mu: cl * d.mu + boxCoxOfLog(Math.log(c), d.lambda), sigma: cl * d.sigma };
}

function checkParameters(d: PowerNormal): void {
  assertFiniteNumber(d.lambda, "lambda");
  assertFiniteNumber(d.mu, "mu");
  assertFiniteNumber(d.sigma, "sigma");
  if (!(d.sigma > 0)) throw new StatsInputError(`sigma must be positive (got ${d.sigma})`);
}
