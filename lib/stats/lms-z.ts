/**
 * The LMS method's two formulas: a value's z at given L, M and S, and the value at a given z
 * (the centile curve). Where |L| < 1e−6 the L = 0 (log-normal) branch is used.
 */
import normal from "@stdlib/stats-base-dists-normal";
import { assertFiniteNumber, StatsInputError } from "./validate";

/** Box-Cox power L, median M and coefficient of variation S at one age. */
export interface LmsParameters {
  L: number;
  M: number;
  S: number;
}

/** Below this |L| the L = 0 branch is used (METHODS.md §9, "use the L = 0 branch when |L| < ~1e−6"). */
export const LMS_L_ZERO = 1e-6;

function assertParameters(p: LmsParameters): void {
  assertFiniteNumber(p.L, "L");
  assertFiniteNumber(p.M, "M");
  assertFiniteNumber(p.S, "S");
  if (!(p.M > 0)) throw new StatsInputError(`M must be positive (got ${p.M})`);
  if (!(p.S > 0)) throw new StatsInputError(`S must be positive (got ${p.S})`);
}

/**
 * z of a value under the LMS method: z = ((X/M)^L − 1)/(L·S), or ln(X/M)/S when L = 0.
 * @see Cole TJ, Green PJ. Smoothing reference centile curves: the LMS method and penalized
 *   likelihood. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * Complexity O(1).
 * Throws StatsInputError when X is not a positive finite number, M or S is not positive, or a
 *   parameter is not finite.
 * @example lmsZ({ L: 1.815151075, M: 3.530203168, S: 0.152385273 }, 4.0) // 0.920302… (CDC WTAGEINF)
 */
export function lmsZ(p: LmsParameters, x: number): number {
  assertParameters(p);
  assertFiniteNumber(x, "value");
  if (!(x > 0)) throw new StatsInputError(`an LMS z needs a positive value (got ${x})`);
  const r = Math.log(x / p.M);
  if (Math.abs(p.L) < LMS_L_ZERO) return r / p.S;
  return Math.expm1(p.L * r) / (p.L * p.S);
}

/**
 * The value at z under the LMS method (the centile curve): X = M·(1 + L·S·z)^(1/L), or
 * M·exp(S·z) when L = 0. Where 1 + L·S·z ≤ 0 no value has that z: the answer is null, never a
 * clamped number.
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * Complexity O(1).
 * Throws StatsInputError when z or a parameter is not finite, or M or S is not positive.
 * @example lmsValueAtZ({ L: 1.815151075, M: 3.530203168, S: 0.152385273 }, -1.880793608) // 2.355450… (CDC P3)
 */
export function lmsValueAtZ(p: LmsParameters, z: number): number | null {
  assertParameters(p);
  assertFiniteNumber(z, "z");
  if (Math.abs(p.L) < LMS_L_ZERO) return p.M * Math.exp(p.S * z);
  const base = 1 + p.L * p.S * z;
  if (!(base > 0)) return null;
  return p.M * Math.exp(Math.log(base) / p.L);
}

/**
 * The value at a centile (0 < centile < 100) under the LMS method: {@link lmsValueAtZ} at
 * z = Φ⁻¹(centile/100) (Φ⁻¹ from @stdlib). Null where no value has that z.
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * Complexity O(1).
 * Throws StatsInputError when the centile is not strictly between 0 and 100, or as lmsValueAtZ.
 * @example lmsCentile({ L: 1.815151075, M: 3.530203168, S: 0.152385273 }, 97) // 4.446488… (CDC P97)
 */
export function lmsCentile(p: LmsParameters, centile: number): number | null {
  assertFiniteNumber(centile, "centile");
  if (!(centile > 0 && centile < 100)) {
    throw new StatsInputError(`centile must be strictly between 0 and 100 (got ${centile})`);
  }
  return lmsValueAtZ(p, normal.quantile(centile / 100, 0, 1));
}

/**
 * Percentile of a value under the LMS method: 100·Φ(z) with z from {@link lmsZ}.
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * Complexity O(1). Throws as lmsZ.
 * @example lmsPercentile({ L: 1.815151075, M: 3.530203168, S: 0.152385273 }, 4.0) // 82.13…
 */
export function lmsPercentile(p: LmsParameters, x: number): number {
  return 100 * normal.cdf(lmsZ(p, x), 0, 1);
}
