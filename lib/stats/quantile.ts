/**
 * Sample quantiles by the rank rule r = p(n + 1): the convention of IFCC and CLSI for
 * nonparametric reference limits.
 */
import { assertFiniteSample, assertOpenProbability, StatsInputError } from "./validate";

/**
 * Input check: the array is non-empty, finite and sorted ascending.
 * @see common practice
 * Complexity O(n).
 * Throws StatsInputError on an empty, unsorted or non-finite array.
 * @example assertSorted([1, 2, 2, 5]) // passes
 */
export function assertSorted(sorted: readonly number[], name = "sorted values"): void {
  assertFiniteSample(sorted, name);
  for (let i = 1; i < sorted.length; i++) {
    if (sorted[i] < sorted[i - 1]) {
      throw new StatsInputError(`${name} must be sorted ascending (index ${i} breaks the order)`);
    }
  }
}

/**
 * The value at a fractional 1-based rank r of a sorted array, by linear interpolation between
 * x(⌊r⌋) and x(⌊r⌋ + 1); null when r < 1 or r > n. Does not validate the array.
 * @see Hyndman RJ, Fan Y. Am Stat 1996;50:361–365 (the interpolation shared by types 4–9).
 * Complexity O(1). Throws nothing.
 * @example valueAtRank([10, 20, 30], 1.5) // 15
 */
export function valueAtRank(sorted: ArrayLike<number>, r: number): number | null {
  const len = sorted.length;
  if (!(r >= 1) || r > len) return null;
  const k = Math.floor(r);
  const f = r - k;
  if (f === 0 || k === len) return sorted[k - 1];
  return sorted[k - 1] + f * (sorted[k] - sorted[k - 1]);
}

/**
 * Sample quantile, Hyndman & Fan type 6: rank r = p(n + 1), linear interpolation between the
 * neighbouring order statistics. Returns null when r < 1 or r > n: the quantile is not
 * estimable from so few values, and is never clamped to the minimum or maximum.
 * @see Hyndman RJ, Fan Y. Sample quantiles in statistical packages. Am Stat 1996;50:361–365
 *   (definition 6); Solberg HE (IFCC). J Clin Chem Clin Biochem 1987;25:645–656.
 * Complexity O(n) for the order check, O(1) for the quantile.
 * Throws StatsInputError on an empty or unsorted array, a non-finite value, or p outside (0, 1).
 * @example quantileType6([1, 2, 3, 4, 5, 6, 7, 8, 9], 0.25) // 2.5
 */
export function quantileType6(sorted: readonly number[], p: number): number | null {
  assertOpenProbability(p);
  assertSorted(sorted);
  return valueAtRank(sorted, p * (sorted.length + 1));
}

/**
 * Sample quantile, Hyndman & Fan type 7 (R's default): rank 1 + p(n − 1). Used for Tukey's
 * quartiles, where it never leaves the data range.
 * @see Hyndman RJ, Fan Y. Am Stat 1996;50:361–365 (definition 7).
 * Complexity O(n) for the order check, O(1) for the quantile.
 * Throws StatsInputError on an empty or unsorted array, a non-finite value, or p outside [0, 1].
 * @example quantileType7([1, 2, 3, 4, 5, 6, 7, 8, 9], 0.25) // 3
 */
export function quantileType7(sorted: readonly number[], p: number): number {
  if (typeof p !== "number" || !(p >= 0 && p <= 1)) {
    throw new StatsInputError(`p must be a number between 0 and 1 (got ${String(p)})`);
  }
  assertSorted(sorted);
  return valueAtRank(sorted, 1 + p * (sorted.length - 1)) as number;
}
