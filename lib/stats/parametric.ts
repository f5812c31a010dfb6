/**
 * Parametric (Gaussian) reference limits on the raw, ln or Box-Cox scale, with 90% CIs.
 */
import normal from "@stdlib/stats-base-dists-normal";
import { boxCoxFit, boxCoxInverse, boxCoxTransform } from "./box-cox";
import { mean as meanOf, sampleSd } from "./descriptive";
import { noncentralTQuantile } from "./noncentral-t";
import {
  assertFiniteNumber,
  assertFiniteSample,
  assertPositiveSample,
  StatsInputError,
} from "./validate";

export type Transform = "none" | "ln" | "box-cox";

/** z(0.975) = Φ⁻¹(0.975), from @stdlib: the multiplier of a central 95% interval. */
export const Z_975 = normal.quantile(0.975, 0, 1);

export interface ParametricLimits {
  transform: Transform;
  /** Box-Cox λ; null for the other scales. */
  lambda: number | null;
  /** Mean and SD (n − 1) on the transformed scale. */
  mean: number;
  sd: number;
  /** Limits in the data's unit; null where the back-transformation is undefined. */
  lower: number | null;
  upper: number | null;
  lowerCi: [number, number] | null;
  upperCi: [number, number] | null;
}

export interface ParametricOptions {
  transform?: Transform;
  /** Box-Cox λ to use; estimated by maximum likelihood on [−3, 3] when absent. */
  lambda?: number;
}

/**
 * The forward map of a scale (raw, ln, Box-Cox with λ) applied to one value.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(1).
 * Throws StatsInputError for a value the scale cannot take (non-positive on ln or Box-Cox).
 * @example toScale(Math.E, "ln", null) // 1
 */
export function toScale(x: number, transform: Transform, lambda: number | null): number {
  if (transform === "none") return x;
  if (transform === "ln") {
    assertPositiveSample([x], "value");
    return Math.log(x);
  }
  return boxCoxTransform(x, lambda ?? 1);
}

/**
 * The inverse map of a scale; null where it is undefined (Box-Cox with 1 + λy ≤ 0).
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(1). Throws StatsInputError on a non-finite y.
 * @example fromScale(1, "box-cox", -2) // null
 */
export function fromScale(y: number, transform: Transform, lambda: number | null): number | null {
  if (transform === "none") return y;
  if (transform === "ln") return Math.exp(y);
  const l = lambda ?? 1;
  if (l !== 0 && !(1 + l * y > 0)) return null;
  return boxCoxInverse(y, l);
}

/**
 * The factors of the exact 90% CI of a Gaussian percentile μ + z·σ estimated by x̄ + z·s from
 * n values: k_q = t′(q; ν = n − 1, δ = z·√n)/√n for q = 0.05 and 0.95, so that
 * [x̄ + k_0.05·s, x̄ + k_0.95·s] covers μ + z·σ with probability 90%. By symmetry the lower
 * limit x̄ − z·s has [x̄ − k_0.95·s, x̄ − k_0.05·s].
 * @see Owen DB. A survey of properties and applications of the noncentral t-distribution.
 *   Technometrics 1968;10:445–478 (tolerance and percentile bounds); METHODS.md §2.3.
 * Complexity: two noncentral t quantiles.
 * Throws StatsInputError when n is not an integer ≥ 2 or z is not finite.
 * @example parametricCiFactors(20) // [1.4426…, 2.8095…]
 */
export function parametricCiFactors(n: number, z = Z_975): [number, number] {
  if (!Number.isInteger(n) || n < 2) throw new StatsInputError(`n must be an integer ≥ 2 (got ${n})`);
  assertFiniteNumber(z, "z");
  const root = Math.sqrt(n);
  const delta = z * root;
  return [noncentralTQuantile(0.05, n - 1, delta) / root, noncentralTQuantile(0.95, n - 1, delta) / root];
}

function ciOf(a: number, b: number, t: Transform, l: number | null): [number, number] | null {
  const x = fromScale(a, t, l);
  const y = fromScale(b, t, l);
  return x === null || y === null ? null : [x, y];
}

/**
 * Parametric 95% reference limits: mean ± z(0.975)·SD on the chosen scale (raw, ln, or
 * Box-Cox with λ given or estimated), carried back to the data's unit. The 90% CI of each
 * limit is exact for Gaussian data on the transformed scale, from the noncentral t (see
 * {@link parametricCiFactors}): [x̄ + k_0.05·s, x̄ + k_0.95·s] for the upper limit,
 * [x̄ − k_0.95·s, x̄ − k_0.05·s] for the lower, both ends carried back. It is asymmetric about
 * the limit, wider on the side away from the mean. A limit, or a CI with an end, whose
 * back-transformation is undefined is null.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252; CLSI EP28-A3c (2010); Solberg HE
 *   (IFCC). J Clin Chem Clin Biochem 1987;25:645–656; Owen DB. Technometrics 1968;10:445–478.
 * Complexity O(n), plus the λ search for Box-Cox without λ, plus two noncentral t quantiles.
 * Throws StatsInputError on fewer than 3 values, a non-finite value, values that are all
 *   equal, or a non-positive value on the ln or Box-Cox scale.
 * @example parametricLimits([2.1, 2.9, 3.2, 3.8, 4.4, 5.0, 5.9, 7.3, 9.6, 14.2], { transform: "ln" })
 *   // lower 1.6015, upper 15.5459
 */
export function parametricLimits(
  values: readonly number[],
  options: ParametricOptions = {},
): ParametricLimits {
  assertFiniteSample(values, "values", 3);
  const transform = options.transform ?? "none";
  let lambda: number | null = null;
  let y: readonly number[];
  if (transform === "none") {
    y = values;
  } else if (transform === "ln") {
    assertPositiveSample(values);
    y = values.map(Math.log);
  } else if (transform === "box-cox") {
    assertPositiveSample(values);
    if (options.lambda !== undefined) assertFiniteNumber(options.lambda, "lambda");
    lambda = options.lambda ?? boxCoxFit(values).lambda;
    y = boxCoxTransform(values, lambda);
  } else {
    throw new StatsInputError(`unknown transform "${String(transform)}"`);
  }
  return parametricFromScale(y, transform, lambda);
}

/**
 * As {@link parametricLimits}, for values already on the transformed scale; `transform` and
 * `lambda` name that scale so the limits can be carried back.
 * @see as parametricLimits
 * Complexity O(n), plus two noncentral t quantiles. Throws StatsInputError on fewer than 3
 *   values, a non-finite value or values that are all equal.
 * @example parametricFromScale([1, 2, 3], "none", null).upper // 3.9599…
 */
export function parametricFromScale(
  y: readonly number[],
  transform: Transform,
  lambda: number | null,
): ParametricLimits {
  assertFiniteSample(y, "values", 3);
  const n = y.length;
  const m = meanOf(y);
  const s = sampleSd(y);
  if (!(s > 0)) throw new StatsInputError("parametric limits need spread: all values are equal");
  const [k05, k95] = parametricCiFactors(n);
  return {
    transform,
    lambda,
    mean: m,
    sd: s,
    lower: fromScale(m - Z_975 * s, transform, lambda),
    upper: fromScale(m + Z_975 * s, transform, lambda),
    lowerCi: ciOf(m - k95 * s, m - k05 * s, transform, lambda),
    upperCi: ciOf(m + k05 * s, m + k95 * s, transform, lambda),
  };
}
