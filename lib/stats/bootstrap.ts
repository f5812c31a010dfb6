/**
 * Percentile bootstrap confidence intervals, drawn from a seeded generator.
 */
import { createRandom } from "./random";
import { quantileType6OfSorted } from "./quantile";
import { assertFiniteNumber, assertFiniteSample, StatsInputError } from "./validate";

export interface BootstrapOptions {
  /** Number of resamples; default 1000. */
  replicates?: number;
  /** Two-sided confidence level; default 0.90 (5th and 95th percentiles). */
  level?: number;
  /** Seed of the generator; default 1. Store it with the result. */
  seed?: number;
}

export interface BootstrapInterval {
  lower: number;
  upper: number;
  /** Replicates in which the statistic could be computed. */
  used: number;
}

/**
 * Nonparametric percentile bootstrap of a vector-valued statistic: draw n values with
 * replacement `replicates` times, recompute the statistic, and take the (1 − level)/2 and
 * (1 + level)/2 quantiles (type 6) of each component's bootstrap distribution. A component
 * the statistic cannot compute on a resample (null) is left out of that component's
 * distribution; its interval is null when fewer than half the replicates gave a value.
 * @see Efron B, Tibshirani RJ. An Introduction to the Bootstrap. Chapman & Hall, 1993, ch. 13;
 *   Linnet K. Nonparametric estimation of reference intervals by simple and bootstrap-based
 *   procedures. Clin Chem 2000;46:867–869.
 * Complexity O(B·(n + cost of the statistic)) time, O(B·k) memory for k components.
 * Throws StatsInputError on an empty or non-finite sample, replicates < 100, a level outside
 *   (0, 1), or a non-integer seed.
 * @example percentileBootstrap([1, 2, 3, 4, 5], (s) => [s.reduce((a, b) => a + b) / s.length], { seed: 7 })
 */
export function percentileBootstrap(
  values: readonly number[],
  statistic: (resample: number[]) => readonly (number | null)[],
  options: BootstrapOptions = {},
): (BootstrapInterval | null)[] {
  assertFiniteSample(values);
  const replicates = options.replicates ?? 1000;
  const level = options.level ?? 0.9;
  const seed = options.seed ?? 1;
  if (!Number.isInteger(replicates) || replicates < 100) {
    throw new StatsInputError(`replicates must be an integer of at least 100 (got ${replicates})`);
  }
  assertFiniteNumber(level, "level");
  if (!(level > 0 && level < 1)) throw new StatsInputError(`level must lie in (0, 1) (got ${level})`);
  const rng = createRandom(seed);
  const len = values.length;
  const resample = new Array<number>(len);
  let draws: number[][] | null = null;
  for (let b = 0; b < replicates; b++) {
    for (let i = 0; i < len; i++) resample[i] = values[rng.nextInt(len)];
    const out = statistic(resample);
    if (draws === null) draws = out.map(() => []);
    for (let k = 0; k < out.length; k++) {
      const v = out[k];
      if (v !== null && Number.isFinite(v)) draws[k].push(v);
    }
  }
  const alpha = (1 - level) / 2;
  return (draws ?? []).map((d) => {
    if (d.length < replicates / 2) return null;
    const sorted = Float64Array.from(d).sort();
    const lower = quantileType6OfSorted(sorted, alpha);
    const upper = quantileType6OfSorted(sorted, 1 - alpha);
    if (lower === null || upper === null) return null;
    return { lower, upper, used: d.length };
  });
}
