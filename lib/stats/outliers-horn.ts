/**
 * Horn's outlier screen for reference values: Box-Cox transformation to symmetry, then Tukey's
 * fences on the transformed scale, repeated until nothing more is flagged.
 */
import { boxCoxFitFromTable, boxCoxOfValue, logTableOfSorted, type LogTable } from "./box-cox";
import type { OutlierProposal } from "./outliers";
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
 * run of the sorted data, so each round costs one λ search (over the distinct values) and
 * no copying. The values reported are exactly those outside the final kept run.
 * @see Horn PS, Feng L, Li Y, Pesce AJ. Effect of outliers and nonhealthy individuals on
 *   reference interval estimation. Clin Chem 2001;47:2137–2145; Tukey JW. Exploratory Data
 *   Analysis, 1977; Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252.
 * Complexity O(n log n) for the sort, then O(d) per likelihood evaluation (d distinct values,
 *   ≈ 20 evaluations per round).
 * Throws StatsInputError on fewer than 4 values, a non-positive or non-finite value, or a
 *   bad k.
 * @example hornOutliers([...eightyHealthyValues, 900]).outliers.some((o) => o.value === 900) // true
 */
export function hornOutliers(values: readonly number[], options: HornOptions = {}): HornResult {
  assertPositiveSample(values);
  const screen = hornScreenSorted(Float64Array.from(values).sort(), options);
  const outliers = hornProposals(values, screen);
  const { lambda, lowerFence, upperFence, iterations, converged } = screen;
  return { outliers, lambda, lowerFence, upperFence, iterations, converged };
}

/**
 * The proposals of a finished Horn screen for the caller's values, in their order: every value
 * outside the final kept run, each with the round that set it aside, that round's λ, its
 * Box-Cox value and the round's quartiles and fences on the Box-Cox scale.
 * @see Horn PS, Feng L, Li Y, Pesce AJ. Clin Chem 2001;47:2137–2145; {@link hornOutliers}.
 * Complexity O(n + p·r) for p proposals and r rounds. Throws nothing (values positive, as the
 *   screen required).
 * @example hornProposals(values, hornScreenSorted(Float64Array.from(values).sort()))
 */
export function hornProposals(values: readonly number[], screen: HornScreen): OutlierProposal[] {
  const { rounds, k } = screen;
  const outliers: OutlierProposal[] = [];
  if (rounds.length === 0) return outliers;
  const last = rounds[rounds.length - 1];
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v >= last.keptMin && v <= last.keptMax) continue;
    const low = v < last.keptMin;
    const r = rounds.findIndex((rd) => (low ? v < rd.keptMin : v > rd.keptMax));
    const rd = rounds[r];
    const y = boxCoxOfValue(v, rd.lambda);
    const fence = low ? rd.lowerFence : rd.upperFence;
    outliers.push({
      index: i,
      value: v,
      method: "horn",
      reason:
        `Box-Cox value ${y.toPrecision(6)} (λ = ${rd.lambda.toFixed(4)}) is ` +
        `${low ? "below the lower" : "above the upper"} fence ${fence.toPrecision(6)} (round ${r + 1})`,
      evidence: {
        rule: "horn",
        side: low ? "low" : "high",
        lambda: rd.lambda,
        transformedValue: y,
        q1: rd.q1,
        q3: rd.q3,
        k,
        lowerFence: rd.lowerFence,
        upperFence: rd.upperFence,
        round: r + 1,
      },
    });
  }
  return outliers;
}

export interface HornRound {
  lambda: number;
  /** Type-7 quartiles of the Box-Cox values kept at the start of the round. */
  q1: number;
  q3: number;
  lowerFence: number;
  upperFence: number;
  /** Smallest and largest value kept after the round. */
  keptMin: number;
  keptMax: number;
}

export interface HornScreen {
  /** The values kept are sorted[from..to). */
  from: number;
  to: number;
  rounds: HornRound[];
  /** The Tukey multiplier used. */
  k: number;
  lambda: number;
  lowerFence: number;
  upperFence: number;
  iterations: number;
  converged: boolean;
}

/**
 * Horn's screen on positive values already sorted ascending (not re-checked), for callers that
 * have sorted once: returns the kept run sorted[from..to) and each round, instead of proposals.
 * @see {@link hornOutliers}
 * Complexity O(d) per likelihood evaluation, d distinct values; no sort.
 * Throws StatsInputError on fewer than 4 values or a bad k.
 * @example hornScreenSorted(Float64Array.from(values).sort()).to
 */
export function hornScreenSorted(sorted: Float64Array, options: HornOptions = {}): HornScreen {
  if (sorted.length < 4) {
    throw new StatsInputError(`Horn's method needs at least 4 values (got ${sorted.length})`);
  }
  const k = options.k ?? 1.5;
  if (!(k > 0)) throw new StatsInputError(`the fence multiplier k must be positive (got ${k})`);
  const maxIterations = options.maxIterations ?? HORN_MAX_ITERATIONS;
  const table = logTableOfSorted(sorted);

  // Kept values: sorted[lo..hi) of the data, and rows [uLo, uHi) of the table of distinct values.
  let lo = 0;
  let hi = sorted.length;
  let uLo = 0;
  let uHi = table.logs.length;
  let lambda = 1;
  let lowerFence = -Infinity;
  let upperFence = Infinity;
  let iterations = 0;
  let converged = false;
  const rounds: HornRound[] = [];

  while (iterations < maxIterations) {
    if (uHi - uLo < 2 || hi - lo < 4) {
      converged = true;
      break;
    }
    iterations++;
    lambda = fitLambda(table, uLo, uHi, iterations === 1 ? null : lambda);
    const l = lambda;
    const t = (v: number) => boxCoxOfValue(v, l);
    // Type-7 quartiles of the transformed kept values: the transform is increasing, so they
    // interpolate between the transforms of two neighbouring sorted values.
    const quartile = (p: number) => {
      const r = p * (hi - lo - 1);
      const a = Math.floor(r);
      const f = r - a;
      const ya = t(sorted[lo + a]);
      return f === 0 ? ya : ya + f * (t(sorted[lo + a + 1]) - ya);
    };
    const q1 = quartile(0.25);
    const q3 = quartile(0.75);
    lowerFence = q1 - k * (q3 - q1);
    upperFence = q3 + k * (q3 - q1);
    const before = hi - lo;
    while (hi - lo > 0 && t(sorted[lo]) < lowerFence) lo++;
    while (hi - lo > 0 && t(sorted[hi - 1]) > upperFence) hi--;
    while (uLo < uHi && table.logs[uLo] < Math.log(sorted[lo])) uLo++;
    while (uHi > uLo && table.logs[uHi - 1] > Math.log(sorted[hi - 1])) uHi--;
    rounds.push({ lambda: l, q1, q3, lowerFence, upperFence, keptMin: sorted[lo], keptMax: sorted[hi - 1] });
    if (hi - lo === before) {
      converged = true;
      break;
    }
  }
  return { from: lo, to: hi, rounds, k, lambda, lowerFence, upperFence, iterations, converged };
}

/** λ̂ on table rows [lo, hi); after the first round a narrow bracket around the last λ̂ suffices. */
function fitLambda(table: LogTable, lo: number, hi: number, previous: number | null): number {
  if (previous !== null) {
    const a = Math.max(-3, previous - 0.5);
    const b = Math.min(3, previous + 0.5);
    const near = boxCoxFitFromTable(table, lo, hi, a, b);
    const onEdge = (near.lambda === a && a > -3) || (near.lambda === b && b < 3);
    if (!onEdge) return near.lambda;
  }
  return boxCoxFitFromTable(table, lo, hi).lambda;
}
