import normal from "@stdlib/stats-base-dists-normal";
import { assertFiniteNumber } from "../stats/validate";
import type { EmpiricalModel } from "./model";

export interface EmpiricalScore {
  z: number;
  percentile: number;
  /** "below"/"above" when the value is outside the reference data and the percentile is a bound. */
  bound: "below" | "above" | null;
}

/**
 * Precomputed form of an empirical model: the distinct values with the first and last 1-based
 * rank of each, so that scoring is one binary search.
 */
export interface EmpiricalIndex {
  n: number;
  distinct: Float64Array;
  first: Float64Array;
  last: Float64Array;
}

export function indexEmpirical(model: EmpiricalModel): EmpiricalIndex {
  const v = model.values;
  const distinct: number[] = [];
  const first: number[] = [];
  const last: number[] = [];
  for (let i = 0; i < v.length; i++) {
    if (i > 0 && v[i] === v[i - 1]) {
      last[last.length - 1] = i + 1;
    } else {
      distinct.push(v[i]);
      first.push(i + 1);
      last.push(i + 1);
    }
  }
  return {
    n: v.length,
    distinct: Float64Array.from(distinct),
    first: Float64Array.from(first),
    last: Float64Array.from(last),
  };
}

/** Fractional rank of x in (0, n+1): the inverse of the type-6 quantile, mid-rank on ties. */
export function empiricalRank(idx: EmpiricalIndex, x: number): { rank: number; bound: "below" | "above" | null } {
  const { distinct, first, last, n } = idx;
  const m = distinct.length;
  if (x < distinct[0]) return { rank: 1, bound: "below" };
  if (x > distinct[m - 1]) return { rank: n, bound: "above" };
  let lo = 0;
  let hi = m - 1;
  // Largest k with distinct[k] ≤ x.
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (distinct[mid] <= x) lo = mid;
    else hi = mid - 1;
  }
  if (distinct[lo] === x) return { rank: (first[lo] + last[lo]) / 2, bound: null };
  const f = (x - distinct[lo]) / (distinct[lo + 1] - distinct[lo]);
  return { rank: last[lo] + f, bound: null };
}

/**
 * Score a value against an empirical model (the sorted reference values): the percentile is the
 * inverse of the type-6 quantile, i.e. the piecewise-linear function through the points
 * (x(i), 100·i/(n+1)), and z = Φ⁻¹(percentile/100).
 *
 * Ties: where several reference values equal x, the quantile function is flat over their ranks
 * i … j, and the percentile is taken at the mid-rank (i + j)/2. Between two distinct values the
 * interpolation runs from the last rank of the lower to the first rank of the upper.
 * Outside the data the percentile is a bound: below 100/(n+1) or above 100·n/(n+1), with z the
 * matching bound, and `bound` says which side.
 *
 * @see Hyndman RJ, Fan Y. Sample quantiles in statistical packages. Am Stat 1996;50:361–365
 *   (definition 6).
 * @param model the empirical scoring model (sorted values)
 * @param x the patient value
 * @returns z, percentile and whether it is a bound
 * @throws StatsInputError for a non-finite value
 * Complexity: O(n) to index the model, O(log n) per value (use {@link indexEmpirical} to reuse).
 * @example
 * scoreEmpirical({ kind: "empirical", values: [1, 2, 3, 4] }, 2.5);
 * // → { z: 0, percentile: 50, bound: null }
 */
export function scoreEmpirical(model: EmpiricalModel | EmpiricalIndex, x: number): EmpiricalScore {
  assertFiniteNumber(x, "value");
  const idx = "distinct" in model ? model : indexEmpirical(model);
  const { rank, bound } = empiricalRank(idx, x);
  const p = rank / (idx.n + 1);
  return { z: normal.quantile(p, 0, 1), percentile: 100 * p, bound };
}
