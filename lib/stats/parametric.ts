/**
 * Parametric (Gaussian) reference limits on the raw, ln or Box-Cox scale, with 90% CIs.
 */
import normal from "@stdlib/stats-base-dists-normal";
import { boxCoxFit, boxCoxInverse, boxCoxTransform } from "./box-cox";
import { mean as meanOf, sampleSd } from "./descriptive";
import {
  assertFiniteNumber,
  assertFiniteSample,
  assertPositiveSample,
  StatsInputError,
} from "./validate";

export type Transform = "none" | "ln" | "box-cox";

/** z(0.975) = Φ⁻¹(0.975), from @stdlib: the multiplier of a central 95% interval. */
export const Z_975 = normal.quantile(0.975, 0, 1);
/** z(0.95) = Φ⁻¹(0.95), from @stdlib: the multiplier of a two-sided 90% CI. */
export const Z_95 = normal.quantile(0.95, 0, 1);

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
 * Standard error of the limit x̄ ± z·s of a Gaussian sample: s·√(1/n + z²/(2(n − 1))), from
 * Var(x̄) = σ²/n and Var(s) ≈ σ²/(2(n − 1)), with x̄ and s independent.
 * @see Harris EK, Boyd JC. Statistical Bases of Reference Values in Laboratory Medicine.
 *   Marcel Dekker, 1995; derivation in METHODS.md §2.3.
 * Complexity O(1). Throws StatsInputError when n < 2 or s is negative or not finite.
 * @example parametricLimitSe(1, 120) // 0.1557…
 */
export function parametricLimitSe(s: number, n: number, z = Z_975): number {
  assertFiniteNumber(s, "sd");
  if (s < 0) throw new StatsInputError(`sd must not be negative (got ${s})`);
  if (!Number.isInteger(n) || n < 2) throw new StatsInputError(`n must be an integer ≥ 2 (got ${n})`);
  return s * Math.sqrt(1 / n + (z * z) / (2 * (n - 1)));
}

function ciOf(center: number, se: number, t: Transform, l: number | null): [number, number] | null {
  const a = fromScale(center - Z_95 * se, t, l);
  const b = fromScale(center + Z_95 * se, t, l);
  return a === null || b === null ? null : [a, b];
}

/**
 * Parametric 95% reference limits: mean ± z(0.975)·SD on the chosen scale (raw, ln, or
 * Box-Cox with λ given or estimated), carried back to the data's unit. The 90% CI of each
 * limit is L ± z(0.95)·SE on the transformed scale, SE = s·√(1/n + z²/(2(n − 1))), with both
 * ends carried back. A limit or CI whose back-transformation is undefined is null.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252; CLSI EP28-A3c (2010); Solberg HE
 *   (IFCC). J Clin Chem Clin Biochem 1987;25:645–656.
 * Complexity O(n), plus the λ search for Box-Cox without λ.
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
 * Complexity O(n). Throws StatsInputError on fewer than 3 values, a non-finite value or
 *   values that are all equal.
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
  const lo = m - Z_975 * s;
  const hi = m + Z_975 * s;
  const se = parametricLimitSe(s, n);
  return {
    transform,
    lambda,
    mean: m,
    sd: s,
    lower: fromScale(lo, transform, lambda),
    upper: fromScale(hi, transform, lambda),
    lowerCi: ciOf(lo, se, transform, lambda),
    upperCi: ciOf(hi, se, transform, lambda),
  };
}
