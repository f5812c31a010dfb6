/**
 * Order-statistic ranks for the 90% confidence interval of a nonparametric reference limit.
 */
import binomial from "@stdlib/stats-base-dists-binomial";
import { assertOpenProbability, StatsInputError } from "./validate";

export interface RankInterval {
  /** 1-based ranks [r1, r2] of the CI of the lower limit (the p-th percentile). */
  lower: [number, number];
  /** 1-based ranks of the CI of the upper limit (the (1 − p)-th percentile): n+1−r2 … n+1−r1. */
  upper: [number, number];
  /** Exact coverage P(r1 ≤ B ≤ r2 − 1) with B ~ Binomial(n, p). */
  coverage: number;
}

/**
 * Equal-tail binomial ranks for the confidence interval of the p-th percentile: the number B
 * of values below the true percentile is Binomial(n, p); r1 is the largest rank with
 * P(B ≤ r1 − 1) ≤ (1 − level)/2 and r2 the smallest with P(B ≤ r2 − 1) ≥ (1 + level)/2. The
 * upper limit's ranks follow by symmetry. Returns null when no such r1 ≥ 1 exists (for a 95%
 * interval with a 90% CI, n < 119). n = 120 gives ranks 1–7 and 114–120, coverage 0.92047.
 * @see Reed AH, Henry RJ, Mason WB. Influence of statistical method used on the resulting
 *   estimate of normal range. Clin Chem 1971;17:275–284; CLSI EP28-A3c (2010), Table 8; David
 *   HA, Nagaraja HN. Order Statistics, 3rd ed., Wiley 2003, §7.1.
 * Complexity O(1) calls of the binomial CDF and quantile (from @stdlib), plus a few steps.
 * Throws StatsInputError when n is not a positive integer, or p or level lies outside (0, 1),
 *   or p > 0.5.
 * @example binomialRankCi(120) // { lower: [1, 7], upper: [114, 120], coverage: 0.92047… }
 */
export function binomialRankCi(n: number, p = 0.025, level = 0.9): RankInterval | null {
  if (!Number.isSafeInteger(n) || n < 1) {
    throw new StatsInputError(`n must be a positive integer (got ${String(n)})`);
  }
  assertOpenProbability(p);
  assertOpenProbability(level, "level");
  if (p > 0.5) throw new StatsInputError(`p must be at most 0.5; the upper limit follows by symmetry`);
  const lowTail = (1 - level) / 2;
  const highTail = (1 + level) / 2;
  const F = (k: number) => (k < 0 ? 0 : binomial.cdf(k, n, p));

  // k1 = r1 − 1 = the largest k with F(k) ≤ lowTail, found from the quantile then settled.
  let k1 = binomial.quantile(lowTail, n, p);
  while (k1 >= 0 && F(k1) > lowTail) k1--;
  while (F(k1 + 1) <= lowTail) k1++;
  if (k1 < 0) return null;
  // k2 = r2 − 1 = the smallest k with F(k) ≥ highTail.
  let k2 = binomial.quantile(highTail, n, p);
  while (k2 > 0 && F(k2 - 1) >= highTail) k2--;
  while (F(k2) < highTail) k2++;
  const r1 = k1 + 1;
  const r2 = k2 + 1;
  if (r2 > n) return null;
  return {
    lower: [r1, r2],
    upper: [n + 1 - r2, n + 1 - r1],
    coverage: F(k2) - F(k1),
  };
}
