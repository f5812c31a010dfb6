import normal from "@stdlib/stats-base-dists-normal";
import { assertFiniteSample, StatsInputError } from "./validate";

export interface ShapiroWilkResult {
  /** The W statistic, in (0, 1]; values near 1 are consistent with a normal distribution. */
  w: number;
  /** Royston's approximate p-value (adequate for p < 0.1, as R's documentation notes). */
  p: number;
}

const MIN_N = 3;
const MAX_N = 5000;

// Royston (1995) AS R94 coefficients, ascending powers (METHODS.md §5.1).
const C1 = [0, 0.221157, -0.147981, -2.07119, 4.434685, -2.706056];
const C2 = [0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633];
const SMALL_GAMMA = [-2.273, 0.459];
const SMALL_MEAN = [0.544, -0.39978, 0.025054, -6.714e-4];
const SMALL_LOG_SD = [1.3822, -0.77857, 0.062767, -0.0020322];
const LARGE_MEAN = [-1.5861, -0.31082, -0.083751, 0.0038915];
const LARGE_LOG_SD = [-0.4803, -0.082676, 0.0030302];

function poly(c: readonly number[], x: number): number {
  let result = 0;
  for (let i = c.length - 1; i >= 0; i--) result = result * x + c[i];
  return result;
}

/**
 * Royston's coefficients a₁ … a_⌊n/2⌋ for the differences x(n+1−i) − x(i), normalised so
 * that the full antisymmetric vector has unit length.
 */
function coefficients(n: number): Float64Array {
  const half = Math.floor(n / 2);
  const a = new Float64Array(half);
  if (n === 3) {
    a[0] = Math.SQRT1_2;
    return a;
  }
  // m holds the (negative) lower-half Blom scores; the coefficients are their magnitudes.
  const m = new Float64Array(half);
  let summ2 = 0;
  for (let i = 0; i < half; i++) {
    m[i] = normal.quantile((i + 1 - 0.375) / (n + 0.25), 0, 1);
    summ2 += m[i] * m[i];
  }
  summ2 *= 2;
  const ssumm2 = Math.sqrt(summ2);
  const rsn = 1 / Math.sqrt(n);
  const a1 = poly(C1, rsn) - m[0] / ssumm2;
  let first: number;
  let fac: number;
  if (n > 5) {
    const a2 = poly(C2, rsn) - m[1] / ssumm2;
    fac = Math.sqrt((summ2 - 2 * m[0] * m[0] - 2 * m[1] * m[1]) / (1 - 2 * a1 * a1 - 2 * a2 * a2));
    a[1] = a2;
    first = 2;
  } else {
    fac = Math.sqrt((summ2 - 2 * m[0] * m[0]) / (1 - 2 * a1 * a1));
    first = 1;
  }
  a[0] = a1;
  for (let i = first; i < half; i++) a[i] = -m[i] / fac;
  return a;
}

/**
 * Shapiro-Wilk W test of normality, with Royston's approximation to the coefficients and the
 * p-value (Algorithm AS R94, the method behind R's `shapiro.test`).
 *
 * W is computed as the squared correlation between the sorted values and the coefficients, and
 * 1 − W is formed directly as (r − s)(r + s)/r² so that W close to 1 keeps its precision.
 *
 * @see Shapiro SS, Wilk MB. An analysis of variance test for normality (complete samples).
 *   Biometrika 1965;52:591–611.
 * @see Royston P. Remark AS R94: A remark on Algorithm AS 181: the W-test for normality.
 *   Applied Statistics 1995;44:547–551.
 * @param x the sample, 3 to 5000 finite values, not all equal (order does not matter)
 * @returns W and its p-value
 * @throws StatsInputError for fewer than 3 or more than 5000 values, a non-finite value, or
 *   a sample whose values are all equal
 * Complexity: O(n log n) time for the sort, O(n) memory.
 * @example
 * shapiroWilk([148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236]);
 * // → { w: 0.788815, p: 0.006704 }
 */
export function shapiroWilk(x: readonly number[]): ShapiroWilkResult {
  assertFiniteSample(x, "values", MIN_N);
  const n = x.length;
  if (n > MAX_N) {
    throw new StatsInputError(
      `Shapiro-Wilk (Royston) is defined for ${MIN_N} to ${MAX_N} values (got ${n})`,
    );
  }
  const sorted = Float64Array.from(x).sort();
  const range = sorted[n - 1] - sorted[0];
  if (!(range > 0)) {
    throw new StatsInputError("Shapiro-Wilk needs spread in the values: all values are equal");
  }

  const a = coefficients(n);
  // Scaling by the range keeps the sums well inside double range for any unit.
  let meanScaled = 0;
  for (let i = 0; i < n; i++) meanScaled += sorted[i] / range;
  meanScaled /= n;
  let ssa = 0;
  let ssx = 0;
  let sax = 0;
  for (let i = 0; i < n; i++) {
    const j = n - 1 - i;
    // The coefficient vector is antisymmetric with mean zero: −a for the lower half,
    // +a for the upper half, 0 for the middle value of an odd sample.
    const coef = i < j ? -a[i] : i > j ? a[j] : 0;
    const xc = sorted[i] / range - meanScaled;
    ssa += coef * coef;
    ssx += xc * xc;
    sax += coef * xc;
  }
  const root = Math.sqrt(ssa * ssx);
  const oneMinusW = ((root - sax) * (root + sax)) / (ssa * ssx);
  const w = 1 - oneMinusW;

  return { w, p: pValue(n, w, oneMinusW) };
}

function pValue(n: number, w: number, oneMinusW: number): number {
  if (n === 3) {
    // Exact distribution for n = 3: p = (6/π)(asin √W − asin √(3/4)).
    const p = (6 / Math.PI) * (Math.asin(Math.sqrt(Math.min(w, 1))) - Math.PI / 3);
    return Math.max(p, 0);
  }
  const y = Math.log(oneMinusW);
  let mu: number;
  let sigma: number;
  let stat: number;
  if (n <= 11) {
    const gamma = poly(SMALL_GAMMA, n);
    // Beyond γ the approximation is undefined and W is so far from 1 that p is negligible.
    if (y >= gamma) return 0;
    stat = -Math.log(gamma - y);
    mu = poly(SMALL_MEAN, n);
    sigma = Math.exp(poly(SMALL_LOG_SD, n));
  } else {
    const u = Math.log(n);
    stat = y;
    mu = poly(LARGE_MEAN, u);
    sigma = Math.exp(poly(LARGE_LOG_SD, u));
  }
  // Upper tail, taken as Φ of the negated score so tiny p-values keep their precision.
  return normal.cdf(-(stat - mu) / sigma, 0, 1);
}
