/**
 * Tukey's fences.
 */
import type { OutlierProposal } from "./outliers";
import { valueAtRank } from "./quantile";
import { assertFiniteNumber, assertFiniteSample, StatsInputError } from "./validate";

export interface TukeyFences {
  q1: number;
  q3: number;
  lowerFence: number;
  upperFence: number;
}

/**
 * Quartiles (Hyndman-Fan type 7, R's default: rank 1 + p(n − 1)) and fences Q1 − k·IQR,
 * Q3 + k·IQR of values sorted ascending. Type 7 is chosen because it never leaves the data
 * range at small n; on the Shapiro-Wilk weights it agrees with Tukey's hinges.
 * @see Tukey JW. Exploratory Data Analysis. Addison-Wesley, 1977; Hyndman RJ, Fan Y. Am Stat
 *   1996;50:361–365.
 * Complexity O(1) on a sorted array (not re-checked).
 * Throws StatsInputError on an empty array or k ≤ 0.
 * @example tukeyFencesOfSorted([148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236])
 *   // { q1: 159, q3: 176, lowerFence: 133.5, upperFence: 201.5 }
 */
export function tukeyFencesOfSorted(sorted: ArrayLike<number>, k = 1.5): TukeyFences {
  if (sorted.length === 0) throw new StatsInputError("values is empty");
  assertFiniteNumber(k, "k");
  if (!(k > 0)) throw new StatsInputError(`the fence multiplier k must be positive (got ${k})`);
  const len = sorted.length;
  const q1 = valueAtRank(sorted, 1 + 0.25 * (len - 1)) as number;
  const q3 = valueAtRank(sorted, 1 + 0.75 * (len - 1)) as number;
  const iqr = q3 - q1;
  return { q1, q3, lowerFence: q1 - k * iqr, upperFence: q3 + k * iqr };
}

export interface TukeyResult extends TukeyFences {
  outliers: OutlierProposal[];
}

/**
 * Tukey's fences on the raw values: proposes every value below Q1 − k·IQR or above
 * Q3 + k·IQR (k = 1.5; 3 gives "far out" values), quartiles of type 7. One pass, not
 * iterated. On skewed data transform first (see outliers-horn.ts), or the long tail erodes.
 * @see Tukey JW. Exploratory Data Analysis. Addison-Wesley, 1977.
 * Complexity O(n log n) (one sort).
 * Throws StatsInputError on an empty array, a non-finite value, or k ≤ 0.
 * @example tukeyOutliers([148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236]).outliers[0].value // 236
 */
export function tukeyOutliers(values: readonly number[], k = 1.5): TukeyResult {
  assertFiniteSample(values);
  const sorted = Float64Array.from(values).sort();
  const fences = tukeyFencesOfSorted(sorted, k);
  const outliers: OutlierProposal[] = [];
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v < fences.lowerFence || v > fences.upperFence) {
      const side = v < fences.lowerFence ? "low" : "high";
      const where =
        side === "low"
          ? `below the lower fence ${fences.lowerFence}`
          : `above the upper fence ${fences.upperFence}`;
      outliers.push({
        index: i,
        value: v,
        method: "tukey",
        reason: `${v} is ${where} (Q1 ${fences.q1}, Q3 ${fences.q3}, k ${k})`,
        evidence: {
          rule: "tukey",
          side,
          value: v,
          q1: fences.q1,
          q3: fences.q3,
          k,
          lowerFence: fences.lowerFence,
          upperFence: fences.upperFence,
        },
      });
    }
  }
  return { ...fences, outliers };
}
