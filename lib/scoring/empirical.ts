import normal from "@stdlib/stats-base-dists-normal";
import { rankTableOfSorted, rankType6, type RankTable } from "../stats/quantile";
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
export type EmpiricalIndex = RankTable;

/**
 * Index an empirical model's sorted reference values for scoring.
 * @see common practice (grouping tied order statistics); rankTableOfSorted in lib/stats/quantile.ts.
 * Complexity O(n). Throws nothing (the model was validated: sorted, at least 2 values).
 * @example indexEmpirical({ kind: "empirical", values: [1, 2, 2, 3] }).last // [1, 3, 4]
 */
export function indexEmpirical(model: EmpiricalModel): EmpiricalIndex {
  return rankTableOfSorted(model.values);
}

/**
 * Fractional rank of x in [1, n] (the inverse of the type-6 quantile, mid-rank on ties, see
 * rankType6) and, outside the reference data, which side the bound lies on.
 * @see Hyndman RJ, Fan Y. Am Stat 1996;50:361–365 (definition 6).
 * Complexity O(log n). Throws nothing.
 * @example empiricalRank(indexEmpirical({ kind: "empirical", values: [1, 2, 3, 4] }), 9) // { rank: 4, bound: "above" }
 */
export function empiricalRank(idx: EmpiricalIndex, x: number): { rank: number; bound: "below" | "above" | null } {
  const bound = x < idx.distinct[0] ? "below" : x > idx.distinct[idx.distinct.length - 1] ? "above" : null;
  return { rank: rankType6(idx, x), bound };
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
