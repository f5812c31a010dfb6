/**
 * Horn's outlier screen for reference values: Box-Cox transformation to symmetry, then Tukey's
 * fences on the transformed scale, repeated until nothing more is flagged.
 */
import { boxCoxFitFromLogs } from "./box-cox";
import { orderOf, type OutlierProposal } from "./outliers";
import { valueAtRank } from "./quantile";
import { assertPositiveSample, StatsInputError } from "./validate";

/** Rounds of re-estimation before giving up; each round usually flags far fewer values. */
export const HORN_MAX_ITERATIONS = 10;

export interface HornResult {
  outliers: OutlierProposal[];
  /** λ of the last fit and the fences of the last round, on the Box-Cox scale. */
  lambda: number;
  lowerFence: number;
  upperFence: number;
  /** Rounds run, and whether the last one flagged nothing (false: stopped by the cap). */
  iterations: number;
  converged: boolean;
}

export interface HornOptions {
  /** Tukey multiplier; default 1.5. */
  k?: number;
  maxIterations?: number;
}

/**
 * Horn's method: estimate the Box-Cox λ by maximum likelihood, compute type-7 quartiles and
 * Tukey fences Q1 − 1.5·IQR, Q3 + 1.5·IQR of the transformed values, propose every value
 * outside them, then re-estimate λ on the values kept and repeat, at most `maxIterations`
 * (10) rounds. Because the transform is increasing, the values kept are always a contiguous
 * run of the sorted data, so each round costs one λ search and no copying.
 * @see Horn PS, Feng L, Li Y, Pesce AJ. Effect of outliers and nonhealthy individuals on
 *   reference interval estimation. Clin Chem 2001;47:2137–2145; Tukey JW. Exploratory Data
 *   Analysis, 1977; Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(n log n) for the sort, then O(n) per likelihood evaluation (≈ 20 per round).
 * Throws StatsInputError on fewer than 4 values, a non-positive or non-finite value, or a
 *   bad k.
 * @example hornOutliers([...eightyHealthyValues, 900]).outliers.some((o) => o.value === 900) // true
 */
export function hornOutliers(values: readonly number[], options: HornOptions = {}): HornResult {
  assertPositiveSample(values);
  if (values.length < 4) {
    throw new StatsInputError(`Horn's method needs at least 4 values (got ${values.length})`);
  }
  const k = options.k ?? 1.5;
  if (!(k > 0)) throw new StatsInputError(`the fence multiplier k must be positive (got ${k})`);
  const maxIterations = options.maxIterations ?? HORN_MAX_ITERATIONS;
  const order = orderOf(values);
  const logs = Float64Array.from(order, (i) => Math.log(values[i]));

  let lo = 0;
  let hi = values.length;
  let lambda = 1;
  let lowerFence = -Infinity;
  let upperFence = Infinity;
  let iterations = 0;
  let converged = false;
  const outliers: OutlierProposal[] = [];

  while (iterations < maxIterations) {
    if (hi - lo < 4 || logs[hi - 1] === logs[lo]) {
      converged = true;
      break;
    }
    iterations++;
    lambda = fitLambda(logs, lo, hi, iterations === 1 ? null : lambda);
    const l = lambda;
    const t = (j: number) => (l === 0 ? logs[j] : Math.expm1(l * logs[j]) / l);
    const m = hi - lo;
    const view = { length: m } as { length: number; [i: number]: number };
    // The quartiles need the transformed values at four positions only.
    const q = (p: number) => {
      const r = 1 + p * (m - 1);
      const a = Math.floor(r);
      view[a - 1] = t(lo + a - 1);
      if (a < m) view[a] = t(lo + a);
      return valueAtRank(view, r) as number;
    };
    const q1 = q(0.25);
    const q3 = q(0.75);
    lowerFence = q1 - k * (q3 - q1);
    upperFence = q3 + k * (q3 - q1);
    const round = iterations;
    const before = outliers.length;
    const flag = (j: number, side: string, fence: number) => {
      outliers.push({
        index: order[j],
        value: values[order[j]],
        method: "horn",
        reason:
          `Box-Cox value ${t(j).toPrecision(6)} (λ = ${l.toFixed(4)}) is ${side} ` +
          `${fence.toPrecision(6)} (round ${round})`,
      });
    };
    while (hi - lo > 0 && t(lo) < lowerFence) flag(lo++, "below the lower fence", lowerFence);
    while (hi - lo > 0 && t(hi - 1) > upperFence) flag(--hi, "above the upper fence", upperFence);
    if (outliers.length === before) {
      converged = true;
      break;
    }
  }
  return { outliers, lambda, lowerFence, upperFence, iterations, converged };
}

/** λ̂ on logs[lo..hi); after the first round a narrow bracket around the last λ̂ suffices. */
function fitLambda(logs: Float64Array, lo: number, hi: number, previous: number | null): number {
  if (previous !== null) {
    const a = Math.max(-3, previous - 0.5);
    const b = Math.min(3, previous + 0.5);
    const near = boxCoxFitFromLogs(logs, lo, hi, a, b);
    const onEdge = (near.lambda === a && a > -3) || (near.lambda === b && b < 3);
    if (!onEdge) return near.lambda;
  }
  return boxCoxFitFromLogs(logs, lo, hi).lambda;
}
