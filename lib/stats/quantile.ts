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
  return quantileType6OfSorted(sorted, p);
}

/**
 * As {@link quantileType6}, without input checks, for callers that hold a sorted copy and a
 * fixed p (the nonparametric limits, each bootstrap replicate).
 * @see Hyndman RJ, Fan Y. Am Stat 1996;50:361–365 (definition 6).
 * Complexity O(1). Throws nothing; null when p(n + 1) is outside [1, n].
 * @example quantileType6OfSorted(Float64Array.of(1, 2, 3, 4, 5, 6, 7, 8, 9), 0.25) // 2.5
 */
export function quantileType6OfSorted(sorted: ArrayLike<number>, p: number): number | null {
  return valueAtRank(sorted, p * (sorted.length + 1));
}

/**
 * Sorted values grouped for rank look-ups: the distinct values with the first and last 1-based
 * rank each one occupies.
 */
export interface RankTable {
  n: number;
  distinct: Float64Array;
  first: Float64Array;
  last: Float64Array;
}

/**
 * The rank table of values sorted ascending (not re-checked).
 * @see common practice (grouping tied order statistics)
 * Complexity O(n). Throws nothing.
 * @example rankTableOfSorted([1, 2, 2, 3]) // { n: 4, distinct: [1, 2, 3], first: [1, 2, 4], last: [1, 3, 4] }
 */
export function rankTableOfSorted(sorted: ArrayLike<number>): RankTable {
  const len = sorted.length;
  let d = len > 0 ? 1 : 0;
  for (let i = 1; i < len; i++) if (sorted[i] !== sorted[i - 1]) d++;
  const distinct = new Float64Array(d);
  const first = new Float64Array(d);
  const last = new Float64Array(d);
  let j = -1;
  for (let i = 0; i < len; i++) {
    if (i === 0 || sorted[i] !== sorted[i - 1]) {
      distinct[++j] = sorted[i];
      first[j] = i + 1;
    }
    last[j] = i + 1;
  }
  return { n: len, distinct, first, last };
}

/**
 * Fractional rank of x, the inverse of the type-6 quantile: the r in [1, n] at which
 * valueAtRank(sorted, r) = x, so that r/(n + 1) is x's empirical cumulative proportion. Where
 * several values equal x the quantile is flat over their ranks i … j and the mid-rank
 * (i + j)/2 is returned; between two distinct values the rank runs linearly from the last rank
 * of the lower to the first rank of the upper. Outside [x(1), x(n)] the rank is clamped to 1 or
 * n: the caller reports a bound there (compare x with the first and last distinct value).
 * @see Hyndman RJ, Fan Y. Sample quantiles in statistical packages. Am Stat 1996;50:361–365
 *   (definition 6, inverted).
 * Complexity O(log d) for d distinct values (binary search). Throws nothing; the table must
 *   not be empty and x must be a number.
 * @example rankType6(rankTableOfSorted([1, 2, 3, 4]), 2.5) // 2.5, i.e. 2.5/5 = 50%
 */
export function rankType6(table: RankTable, x: number): number {
  const { distinct, first, last } = table;
  const top = distinct.length - 1;
  if (x < distinct[0]) return 1;
  if (x > distinct[top]) return table.n;
  let lo = 0;
  let hi = top;
  // Largest k with distinct[k] ≤ x.
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (distinct[mid] <= x) lo = mid;
    else hi = mid - 1;
  }
  if (distinct[lo] === x) return (first[lo] + last[lo]) / 2;
  return last[lo] + (x - distinct[lo]) / (distinct[lo + 1] - distinct[lo]);
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
