import normal from "@stdlib/stats-base-dists-normal";
import { boxCoxOfValue } from "../stats/box-cox";
import { assertFiniteNumber, StatsInputError } from "../stats/validate";
import type { GaussianModel } from "./model";

/** The model's transform g, with a clear error for values it cannot take. */
export function gaussianTransform(model: GaussianModel): (x: number) => number {
  if (model.transform === "none") return (x) => x;
  const lambda = model.transform === "ln" ? 0 : (model.lambda as number);
  const name = model.transform === "ln" ? "a log" : "a Box-Cox";
  return (x) => {
    if (!(x > 0)) {
      throw new StatsInputError(`value ${x} is not positive; ${name} scoring model needs values > 0`);
    }
    return boxCoxOfValue(x, lambda);
  };
}

/**
 * Score a value against a gaussian model: z = (g(x) − mean)/sd with g the model's transform
 * (identity, ln, or Box-Cox with λ), percentile = 100·Φ(z). Full precision; rounding is for
 * display.
 *
 * @see Box GEP, Cox DR. An analysis of transformations. J R Stat Soc B 1964;26:211–252.
 * @see CLSI EP28-A3c (2010): parametric reference limits on a transformed scale.
 * @param model the gaussian scoring model
 * @param x the patient value (> 0 for ln and Box-Cox)
 * @returns z and percentile
 * @throws StatsInputError for a non-finite value, or a value ≤ 0 under ln or Box-Cox
 * Complexity: O(1).
 * @example
 * scoreGaussian({ kind: "gaussian", transform: "none", mean: 4.3, sd: 0.4 }, 5.1);
 * // → { z: 2, percentile: 97.72 }
 */
export function scoreGaussian(model: GaussianModel, x: number): { z: number; percentile: number } {
  assertFiniteNumber(x, "value");
  const z = (gaussianTransform(model)(x) - model.mean) / model.sd;
  return { z, percentile: 100 * normal.cdf(z, 0, 1) };
}
