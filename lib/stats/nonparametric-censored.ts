/**
 * Nonparametric reference limits of a sample with censored values: results reported only as
 * below a limit of quantitation ("<0.5") or above a limit ("> 1000").
 */
import { assertSorted } from "./quantile";
import { binomialRankCi } from "./rank-ci";
import { NONPARAMETRIC_MIN_N } from "./nonparametric";
import { assertFiniteSample, StatsInputError } from "./validate";

/** "<": the true value lies below the number given; ">": above it. */
export type CensoredBound = "<" | ">";

export interface CensoredNonparametricLimits {
  lower: number | null;
  upper: number | null;
  /** Set when the limit's rank falls on a censored value: the limit is then "< lower" or "> lower". */
  lowerCensored: CensoredBound | null;
  upperCensored: CensoredBound | null;
  /** 90% CIs from binomial ranks (n ≥ 119); null below that (no bootstrap of censored data). */
  lowerCi: [number, number] | null;
  upperCi: [number, number] | null;
  /** Per CI end, as for the limits; null when there is no CI. */
  lowerCiCensored: [CensoredBound | null, CensoredBound | null] | null;
  upperCiCensored: [CensoredBound | null, CensoredBound | null] | null;
}

const P_LOW = 0.025;
const P_HIGH = 0.975;

/**
 * Nonparametric 95% reference limits (rank p(n + 1), linear interpolation: Hyndman-Fan type 6)
 * when some values are censored. Every value counts in n. A value censored below ranks below
 * every measured value, one censored above ranks above them all; among themselves censored
 * values rank by their limits. Where a limit's rank (or either of the two ranks it
 * interpolates between) falls on a censored value, the limit is a bound: the same
 * interpolation with each censored value replaced by its limit, reported as "< that" (censored
 * below) or "> that" (censored above). The bound holds because the k-th smallest of values each
 * below its own limit lies below the k-th smallest limit (and likewise above). A limit that
 * would need both a value censored below and one censored above is null. The 90% CIs use the
 * binomial order-statistic ranks from n = 119 on, their ends flagged the same way; below 119
 * values they are null (the bootstrap does not resample censored values).
 * @see Solberg HE (IFCC). J Clin Chem Clin Biochem 1987;25:645–656 (rank rule); CLSI EP28-A3c
 *   (2010); Hyndman RJ, Fan Y. Am Stat 1996;50:361–365 (definition 6); Reed AH et al. Clin
 *   Chem 1971;17:275–284 (binomial ranks).
 * Complexity O(m + b log b + a log a) for m measured, b below and a above values.
 * Throws StatsInputError on a non-finite value or limit, or measured values out of order.
 * @example nonparametricLimitsCensored([0.5, 0.5], [1, 2, 3, …, 38], [])
 *   // n = 40: rank 1.025 lies among the two "<0.5" → lower 0.5, lowerCensored "<";
 *   // rank 39.975 → upper 37.975, upperCensored null; CIs null (n < 119)
 */
export function nonparametricLimitsCensored(
  belowLimits: readonly number[],
  sortedMeasured: readonly number[],
  aboveLimits: readonly number[],
): CensoredNonparametricLimits {
  if (sortedMeasured.length > 0) assertSorted(sortedMeasured, "measured values");
  if (belowLimits.length > 0) assertFiniteSample(belowLimits, "limits of values censored below");
  if (aboveLimits.length > 0) assertFiniteSample(aboveLimits, "limits of values censored above");
  const below = Float64Array.from(belowLimits).sort();
  const above = Float64Array.from(aboveLimits).sort();
  const b = below.length;
  const m = sortedMeasured.length;
  const n = b + m + above.length;
  if (n === 0) throw new StatsInputError("values is empty");
  const at = (k: number): number => (k <= b ? below[k - 1] : k <= b + m ? sortedMeasured[k - b - 1] : above[k - b - m - 1]);
  const sideOf = (k: number): CensoredBound | null => (k <= b ? "<" : k > b + m ? ">" : null);
  const none: CensoredNonparametricLimits = {
    lower: null, upper: null, lowerCensored: null, upperCensored: null,
    lowerCi: null, upperCi: null, lowerCiCensored: null, upperCiCensored: null,
  };
  if (n < NONPARAMETRIC_MIN_N) return none;

  const limit = (p: number): [number | null, CensoredBound | null] => {
    const r = p * (n + 1);
    const k = Math.floor(r);
    const f = r - k;
    const sides = new Set([sideOf(k), ...(f > 0 && k < n ? [sideOf(k + 1)] : [])]);
    if (sides.has("<") && sides.has(">")) return [null, null];
    const value = f === 0 || k === n ? at(k) : at(k) + f * (at(k + 1) - at(k));
    return [value, sides.has("<") ? "<" : sides.has(">") ? ">" : null];
  };
  const [lower, lowerCensored] = limit(P_LOW);
  const [upper, upperCensored] = limit(P_HIGH);
  const ranks = binomialRankCi(n, P_LOW, 0.9);
  if (ranks === null) return { ...none, lower, upper, lowerCensored, upperCensored };
  const [l1, l2] = ranks.lower;
  const [u1, u2] = ranks.upper;
  return {
    lower,
    upper,
    lowerCensored,
    upperCensored,
    lowerCi: [at(l1), at(l2)],
    upperCi: [at(u1), at(u2)],
    lowerCiCensored: [sideOf(l1), sideOf(l2)],
    upperCiCensored: [sideOf(u1), sideOf(u2)],
  };
}
