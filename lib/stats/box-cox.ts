/**
 * The one-parameter Box-Cox power transformation, its inverse, and the maximum-likelihood
 * choice of λ. Reference limits are computed on the transformed scale and carried back.
 */
import { brentMaximize } from "./brent";
import {
  assertFiniteNumber,
  assertFiniteSample,
  assertPositiveSample,
  StatsInputError,
} from "./validate";

/**
 * Box-Cox transform of a value given by its logarithm: (e^(λ·ln x) − 1)/λ, or ln x when λ = 0.
 * The one place the forward formula is written; every caller in Bellwether comes here, and
 * loops that already hold ln x (the likelihood, the estimate's scales) save the logarithm.
 * @see Box GEP, Cox DR. An analysis of transformations. J R Stat Soc B 1964;26:211–252.
 * Complexity O(1). Throws nothing and checks nothing: the caller has validated x > 0 and λ.
 * @example boxCoxOfLog(Math.log(4), 0.5) // 2
 */
export function boxCoxOfLog(lnX: number, lambda: number): number {
  if (lambda === 0) return lnX;
  // expm1 keeps full precision as λ approaches 0, where (x^λ − 1)/λ → ln x.
  return Math.expm1(lambda * lnX) / lambda;
}

/**
 * Box-Cox transform of one value without input checks, for hot loops whose values have been
 * validated (x > 0, λ finite); {@link boxCoxTransform} is the checked entry point.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(1). Throws nothing: x ≤ 0 gives NaN or −Infinity.
 * @example boxCoxOfValue(9, 0.5) // 4
 */
export function boxCoxOfValue(x: number, lambda: number): number {
  return boxCoxOfLog(Math.log(x), lambda);
}

function inverseOne(y: number, lambda: number): number {
  if (lambda === 0) return Math.exp(y);
  const base = 1 + lambda * y;
  if (!(base > 0)) {
    throw new StatsInputError(
      `Box-Cox inverse is undefined: 1 + λ·y = ${base} is not positive (λ = ${lambda}, y = ${y})`,
    );
  }
  return Math.exp(Math.log1p(lambda * y) / lambda);
}

/**
 * Box-Cox power transformation y = (x^λ − 1)/λ, or ln x when λ = 0.
 * @see Box GEP, Cox DR. An analysis of transformations. J R Stat Soc B 1964;26:211–252.
 * Complexity O(n) for an array, O(1) for a number.
 * Throws StatsInputError on a non-positive or non-finite value, an empty array, or a
 *   non-finite λ.
 * @example boxCoxTransform(4, 0.5) // 2
 */
export function boxCoxTransform(x: number, lambda: number): number;
export function boxCoxTransform(x: readonly number[], lambda: number): number[];
export function boxCoxTransform(x: number | readonly number[], lambda: number): number | number[] {
  assertFiniteNumber(lambda, "lambda");
  if (typeof x === "number") {
    assertPositiveSample([x], "value");
    return boxCoxOfValue(x, lambda);
  }
  assertPositiveSample(x);
  return x.map((v) => boxCoxOfValue(v, lambda));
}

/**
 * Inverse Box-Cox transformation x = (1 + λy)^(1/λ), or exp(y) when λ = 0.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(n) for an array, O(1) for a number.
 * Throws StatsInputError when 1 + λy ≤ 0 (no value maps there), on a non-finite y or λ, or an
 *   empty array.
 * @example boxCoxInverse(2, 0.5) // 4
 */
export function boxCoxInverse(y: number, lambda: number): number;
export function boxCoxInverse(y: readonly number[], lambda: number): number[];
export function boxCoxInverse(y: number | readonly number[], lambda: number): number | number[] {
  assertFiniteNumber(lambda, "lambda");
  if (typeof y === "number") {
    assertFiniteNumber(y, "y");
    return inverseOne(y, lambda);
  }
  assertFiniteSample(y, "y");
  return y.map((v) => inverseOne(v, lambda));
}

/**
 * Sorted logarithms with tie counts: laboratory values are reported at a fixed resolution, so
 * a large sample holds far fewer distinct values than values, and the likelihood need only
 * visit each distinct value once.
 */
export interface LogTable {
  /** Distinct ln x, ascending. */
  logs: Float64Array;
  /** How many values share each; null when all counts are 1. */
  counts: Float64Array | null;
}

/**
 * The log table of values sorted ascending (all positive; not re-checked).
 * @see common practice (grouping tied values)
 * Complexity O(n). Throws nothing.
 * @example logTableOfSorted([1, 1, Math.E]) // { logs: [0, 1], counts: [2, 1] }
 */
export function logTableOfSorted(sorted: ArrayLike<number>): LogTable {
  const len = sorted.length;
  let distinct = len > 0 ? 1 : 0;
  for (let i = 1; i < len; i++) if (sorted[i] !== sorted[i - 1]) distinct++;
  const logs = new Float64Array(distinct);
  if (distinct === len) {
    for (let i = 0; i < len; i++) logs[i] = Math.log(sorted[i]);
    return { logs, counts: null };
  }
  const counts = new Float64Array(distinct);
  let j = -1;
  for (let i = 0; i < len; i++) {
    if (i === 0 || sorted[i] !== sorted[i - 1]) logs[++j] = Math.log(sorted[i]);
    counts[j]++;
  }
  return { logs, counts };
}

/**
 * Profile log-likelihood over the rows [from, to) of a log table, without input checks. The
 * transformed values are accumulated about a shift (the middle row) in one pass, which avoids
 * cancellation without storing them.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(d) for d rows. Throws nothing; needs two distinct rows for a finite value.
 * @example boxCoxLogLikFromTable(logTableOfSorted([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]), 1) // -10.55107…
 */
export function boxCoxLogLikFromTable(
  table: LogTable,
  lambda: number,
  from = 0,
  to = table.logs.length,
): number {
  const { logs, counts } = table;
  const mid = logs[from + ((to - from) >> 1)];
  const shift = boxCoxOfLog(mid, lambda);
  let w = 0;
  let s1 = 0;
  let s2 = 0;
  let sl = 0;
  for (let i = from; i < to; i++) {
    const c = counts === null ? 1 : counts[i];
    const d = boxCoxOfLog(logs[i], lambda) - shift;
    w += c;
    s1 += c * d;
    s2 += c * d * d;
    sl += c * logs[i];
  }
  const variance = (s2 - (s1 * s1) / w) / w;
  return -(w / 2) * Math.log(variance) + (lambda - 1) * sl;
}

/**
 * Box-Cox profile log-likelihood ℓ(λ) = −(n/2)·ln σ̂²(λ) + (λ − 1)·Σ ln xᵢ, with σ̂² the
 * variance (denominator n) of the transformed values; the second term is the Jacobian.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252 (section 3).
 * Complexity O(n).
 * Throws StatsInputError on fewer than 2 values, a non-positive or non-finite value, values
 *   that are all equal, or a non-finite λ.
 * @example boxCoxLogLik([1, 2, 3, 4, 5, 6, 7, 8, 9, 10], 1) // -10.55107…
 */
export function boxCoxLogLik(x: readonly number[], lambda: number): number {
  assertFiniteSample(x, "values", 2);
  assertPositiveSample(x);
  assertFiniteNumber(lambda, "lambda");
  assertNotConstant(x);
  return boxCoxLogLikFromTable({ logs: Float64Array.from(x, Math.log), counts: null }, lambda);
}

function assertNotConstant(x: readonly number[]): void {
  for (let i = 1; i < x.length; i++) if (x[i] !== x[0]) return;
  throw new StatsInputError("Box-Cox needs at least two different values");
}

export interface BoxCoxFit {
  lambda: number;
  /** ℓ(λ̂) */
  logLik: number;
  /** True when the maximum lies on an end of the search interval. */
  atBoundary: boolean;
}

/**
 * λ̂ over the rows [from, to) of a log table, without input checks: a grid at steps of about
 * 1 finds the best region, then Brent's method refines it to about 1e−8.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252; Brent RP, 1973.
 * Complexity O(d) per evaluation, about 20–30 evaluations. Throws nothing.
 * @example boxCoxFitFromTable(logTableOfSorted([1, 2, 3, 4, 5, 6, 7, 8, 9, 10])).lambda // 0.72196…
 */
export function boxCoxFitFromTable(
  table: LogTable,
  from = 0,
  to = table.logs.length,
  lower = -3,
  upper = 3,
): BoxCoxFit {
  const f = (l: number) => boxCoxLogLikFromTable(table, l, from, to);
  const steps = Math.max(2, Math.ceil(upper - lower));
  let best = lower;
  let bestF = -Infinity;
  for (let k = 0; k <= steps; k++) {
    const l = lower + ((upper - lower) * k) / steps;
    const v = f(l);
    if (v > bestF) {
      bestF = v;
      best = l;
    }
  }
  const h = (upper - lower) / steps;
  const a = Math.max(lower, best - h);
  const b = Math.min(upper, best + h);
  const r = brentMaximize(f, a, b, 1e-9);
  let lambda = r.x;
  let logLik = r.fx;
  // Brent never evaluates the ends themselves; a maximum on the boundary is taken as such.
  for (const end of [lower, upper]) {
    if (Math.abs(lambda - end) < 1e-6) {
      const fe = f(end);
      if (fe >= logLik) {
        lambda = end;
        logLik = fe;
      }
    }
  }
  return { lambda, logLik, atBoundary: lambda === lower || lambda === upper };
}

/**
 * Maximum-likelihood Box-Cox λ: the maximiser of the profile log-likelihood (with the
 * Jacobian term) on [lower, upper], default [−3, 3], located to better than 1e−6.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252; Brent RP. Algorithms for Minimization
 *   without Derivatives, 1973.
 * Complexity O(n) per likelihood evaluation, about 20–30 evaluations.
 * Throws StatsInputError on fewer than 2 values, a non-positive or non-finite value, values
 *   that are all equal, or a bad search interval.
 * @example boxCoxLambda([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]) // 0.72196…
 */
export function boxCoxLambda(x: readonly number[], lower = -3, upper = 3): number {
  return boxCoxFit(x, lower, upper).lambda;
}

/**
 * As {@link boxCoxLambda}, also returning ℓ(λ̂) and whether λ̂ lies on the boundary.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(n) per likelihood evaluation, about 20–30 evaluations.
 * Throws as {@link boxCoxLambda}.
 * @example boxCoxFit([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]).logLik // -10.41825…
 */
export function boxCoxFit(x: readonly number[], lower = -3, upper = 3): BoxCoxFit {
  assertFiniteSample(x, "values", 2);
  assertPositiveSample(x);
  assertFiniteNumber(lower, "lower");
  assertFiniteNumber(upper, "upper");
  if (!(lower < upper)) throw new StatsInputError(`the λ search interval needs lower < upper`);
  assertNotConstant(x);
  const table = logTableOfSorted(Float64Array.from(x).sort());
  return boxCoxFitFromTable(table, 0, table.logs.length, lower, upper);
}
