/**
 * Descriptive statistics of one sample. Mean and central moments are computed in two passes
 * (mean first, then deviations about it, with the compensating correction term), which keeps
 * full precision when the values sit far from zero, e.g. sodium near 140 mmol/L with SD 2.
 */
import { assertFiniteSample, StatsInputError } from "./validate";

/**
 * Number of values.
 * @see common practice
 * Complexity O(1). Throws StatsInputError on a non-array.
 * @example n([1, 2, 3]) // 3
 */
export function n(x: readonly number[]): number {
  assertFiniteSample(x, "values", 0);
  return x.length;
}

function plainMean(x: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i];
  let m = s / x.length;
  // Second pass: the mean of the residuals corrects the rounding error of the first sum.
  let c = 0;
  for (let i = 0; i < x.length; i++) c += x[i] - m;
  m += c / x.length;
  return m;
}

/**
 * Arithmetic mean, two-pass corrected.
 * @see Chan TF, Golub GH, LeVeque RJ. Algorithms for computing the sample variance: analysis
 *   and recommendations. Am Stat 1983;37:242–247 (corrected two-pass algorithm).
 * Complexity O(n). Throws StatsInputError on an empty array or a non-finite value.
 * @example mean([1, 2, 3, 4]) // 2.5
 */
export function mean(x: readonly number[]): number {
  assertFiniteSample(x);
  return plainMean(x);
}

/** Central moment sums about the mean: [Σd², Σd³, Σd⁴] with the corrected two-pass scheme. */
function centralSums(x: ArrayLike<number>, m: number): [number, number, number, number] {
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let s4 = 0;
  for (let i = 0; i < x.length; i++) {
    const d = x[i] - m;
    const d2 = d * d;
    s1 += d;
    s2 += d2;
    s3 += d2 * d;
    s4 += d2 * d2;
  }
  return [s1, s2, s3, s4];
}

/**
 * Sample variance with the n − 1 denominator (corrected two-pass algorithm).
 * @see Chan TF, Golub GH, LeVeque RJ. Am Stat 1983;37:242–247.
 * Complexity O(n). Throws StatsInputError on fewer than 2 values or a non-finite value.
 * @example sampleVariance([2, 4, 4, 4, 5, 5, 7, 9]) // 4.571428…
 */
export function sampleVariance(x: readonly number[]): number {
  assertFiniteSample(x, "values", 2);
  const m = plainMean(x);
  const [s1, s2] = centralSums(x, m);
  return (s2 - (s1 * s1) / x.length) / (x.length - 1);
}

/**
 * Mean and n − 1 SD in one call, for callers that have already checked their sample (finite
 * values, at least 2) and may hold it in a typed array; no input checks of its own.
 * @see Chan TF, Golub GH, LeVeque RJ. Am Stat 1983;37:242–247.
 * Complexity O(n).
 * @example meanAndSdOfChecked(Float64Array.of(2, 4, 4, 4, 5, 5, 7, 9)) // { mean: 5, sd: 2.138089… }
 */
export function meanAndSdOfChecked(x: ArrayLike<number>): { mean: number; sd: number } {
  const m = plainMean(x);
  const [s1, s2] = centralSums(x, m);
  return { mean: m, sd: Math.sqrt((s2 - (s1 * s1) / x.length) / (x.length - 1)) };
}

/**
 * Sample standard deviation with the n − 1 denominator.
 * @see Chan TF, Golub GH, LeVeque RJ. Am Stat 1983;37:242–247.
 * Complexity O(n). Throws StatsInputError on fewer than 2 values or a non-finite value.
 * @example sampleSd([2, 4, 4, 4, 5, 5, 7, 9]) // 2.138089…
 */
export function sampleSd(x: readonly number[]): number {
  return Math.sqrt(sampleVariance(x));
}

/**
 * Sample skewness, moment estimator g1 = m3 / m2^(3/2) (type 1 of Joanes & Gill).
 * @see Joanes DN, Gill CA. Comparing measures of sample skewness and kurtosis. J R Stat Soc D
 *   1998;47:183–189.
 * Complexity O(n). Throws StatsInputError on fewer than 3 values, a non-finite value, or
 *   values that are all equal (skewness undefined).
 * @example skewness([1, 2, 3, 10]) // 1.0755…
 */
export function skewness(x: readonly number[]): number {
  assertFiniteSample(x, "values", 3);
  const g1 = skewnessOfChecked(x);
  if (Number.isNaN(g1)) throw new StatsInputError("skewness is undefined: all values are equal");
  return g1;
}

/**
 * The same moment skewness for a sample already checked (finite, at least 3 values), possibly
 * in a typed array; NaN when all values are equal. No input checks of its own.
 * @see Joanes DN, Gill CA. J R Stat Soc D 1998;47:183–189.
 * Complexity O(n).
 * @example skewnessOfChecked(Float64Array.of(1, 2, 3, 10)) // 1.0755…
 */
export function skewnessOfChecked(x: ArrayLike<number>): number {
  const m = plainMean(x);
  const [, s2, s3] = centralSums(x, m);
  const m2 = s2 / x.length;
  return m2 === 0 ? NaN : s3 / x.length / Math.pow(m2, 1.5);
}

/**
 * Excess kurtosis, moment estimator g2 = m4 / m2² − 3 (type 1 of Joanes & Gill); 0 for a
 * Gaussian population.
 * @see Joanes DN, Gill CA. J R Stat Soc D 1998;47:183–189.
 * Complexity O(n). Throws StatsInputError on fewer than 4 values, a non-finite value, or
 *   values that are all equal.
 * @example kurtosis([1, 2, 3, 4]) // -1.36
 */
export function kurtosis(x: readonly number[]): number {
  assertFiniteSample(x, "values", 4);
  const m = plainMean(x);
  const [, s2, , s4] = centralSums(x, m);
  const m2 = s2 / x.length;
  if (m2 === 0) throw new StatsInputError("kurtosis is undefined: all values are equal");
  return s4 / x.length / (m2 * m2) - 3;
}

/**
 * Smallest value.
 * @see common practice
 * Complexity O(n). Throws StatsInputError on an empty array or a non-finite value.
 * @example min([3, 1, 2]) // 1
 */
export function min(x: readonly number[]): number {
  assertFiniteSample(x);
  let v = x[0];
  for (let i = 1; i < x.length; i++) if (x[i] < v) v = x[i];
  return v;
}

/**
 * Largest value.
 * @see common practice
 * Complexity O(n). Throws StatsInputError on an empty array or a non-finite value.
 * @example max([3, 1, 2]) // 3
 */
export function max(x: readonly number[]): number {
  assertFiniteSample(x);
  let v = x[0];
  for (let i = 1; i < x.length; i++) if (x[i] > v) v = x[i];
  return v;
}

/**
 * Ascending copy of the values as a plain array. Sorting through a Float64Array uses the
 * engine's numeric sort, several times faster than Array.prototype.sort with a comparator.
 * @see common practice
 * Complexity O(n log n). Throws StatsInputError on an empty array or a non-finite value.
 * @example sortedCopy([3, 1, 2]) // [1, 2, 3]
 */
export function sortedCopy(x: readonly number[]): number[] {
  assertFiniteSample(x);
  const a = Float64Array.from(x).sort();
  return Array.from(a);
}

/**
 * Median of values already sorted ascending (the average of the two middle values when n is
 * even). Does not check the order.
 * @see common practice; equals R `quantile(x, 0.5, type = 6)` and `median(x)`.
 * Complexity O(1). Throws StatsInputError on an empty array.
 * @example medianSorted([1, 2, 3, 4]) // 2.5
 */
export function medianSorted(sorted: ArrayLike<number>): number {
  if (sorted.length === 0) throw new StatsInputError("values is empty");
  const h = sorted.length >> 1;
  return sorted.length % 2 === 1 ? sorted[h] : (sorted[h - 1] + sorted[h]) / 2;
}

/**
 * Median (the average of the two middle values when n is even).
 * @see common practice; equals R `median(x)`.
 * Complexity O(n log n) (sorts a copy). Throws StatsInputError on an empty array or a
 *   non-finite value.
 * @example median([3, 1, 4, 2]) // 2.5
 */
export function median(x: readonly number[]): number {
  return medianSorted(sortedCopy(x));
}

/** The summary printed beside every estimate. */
export interface Summary {
  n: number;
  mean: number;
  sd: number | null;
  median: number;
  skewness: number | null;
  kurtosis: number | null;
  min: number;
  max: number;
}

/**
 * All descriptive statistics of a sample at once; statistics that need more values than given
 * (SD: 2, skewness: 3, kurtosis: 4) or a non-zero spread are null.
 * @see the individual functions of this file.
 * Complexity O(n log n) (one sort). Throws StatsInputError on an empty array or a non-finite
 *   value.
 * @example describe([1, 2, 3]).sd // 1
 */
export function describe(x: readonly number[]): Summary {
  const sorted = sortedCopy(x);
  const m = plainMean(sorted);
  const [s1, s2, s3, s4] = centralSums(sorted, m);
  const len = sorted.length;
  const m2 = s2 / len;
  return {
    n: len,
    mean: m,
    sd: len >= 2 ? Math.sqrt((s2 - (s1 * s1) / len) / (len - 1)) : null,
    median: medianSorted(sorted),
    skewness: len >= 3 && m2 > 0 ? s3 / len / Math.pow(m2, 1.5) : null,
    kurtosis: len >= 4 && m2 > 0 ? s4 / len / (m2 * m2) - 3 : null,
    min: sorted[0],
    max: sorted[len - 1],
  };
}
