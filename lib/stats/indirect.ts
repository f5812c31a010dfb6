/**
 * Indirect reference intervals from routine laboratory results: the truncated maximum
 * likelihood estimate with its bootstrap confidence intervals, Bhattacharya's procedure as a
 * second opinion, and the warnings a scientist needs before trusting either.
 */
import { bhattacharya, type BhattacharyaResult } from "./bhattacharya";
import { percentileBootstrap } from "./bootstrap";
import { indirectCells, type IndirectCells, type RoutineValue } from "./indirect-cells";
import { truncatedMaximumLikelihood, tmlCandidates, type TmlResult } from "./tml";
import { StatsInputError } from "./validate";

/** Default seed of the bootstrap; the seed is part of every estimate. */
export const INDIRECT_DEFAULT_SEED = 1;
/** Bootstrap replicates: 200 up to this many values, 100 above (each replicate refits the model). */
export const INDIRECT_LARGE_N = 20_000;
/** Below this estimated non-diseased fraction the method is not to be trusted (Bellwether's advice, after Jones et al. 2019). */
export const INDIRECT_MIN_FRACTION = 0.6;
/** A difference between TML and Bhattacharya larger than this share of the TML interval's width is a warning. */
export const INDIRECT_DISAGREEMENT = 0.15;

export interface IndirectOptions {
  /** Seed of the bootstrap's generator (default 1). */
  seed?: number;
  /** Bootstrap replicates; default 200, or 100 above 20,000 values; 0 skips the CIs. */
  replicates?: number;
}

export interface IndirectEstimate {
  /** All values, censored ones included. */
  n: number;
  lower: number | null;
  upper: number | null;
  /** 90% bootstrap CIs of the limits, [low, high]; null when not computed or not estimable. */
  lowerCi: [number, number] | null;
  upperCi: [number, number] | null;
  lambda: number;
  mu: number;
  sigma: number;
  /**
   * Estimated non-diseased share of all values, 0–1 (the estimate N_inside/(N·P_inside) can
   * exceed 1 by chance when nearly every value is non-diseased; it is reported as 1 then, and
   * `fractionEstimate` keeps the raw figure).
   */
  fraction: number;
  fractionEstimate: number;
  truncation: [number, number];
  chiSquare: number;
  df: number;
  pValue: number;
  /** Whether the chosen interval passed the fit and plausibility criterion. */
  accepted: boolean;
  secondOpinion: { method: "bhattacharya"; lower: number | null; upper: number | null };
  warnings: string[];
  censored: { below: number; belowLimit: number | null; above: number; aboveLimit: number | null };
  cells: { count: number; binWidth: number; resolution: number | null };
  bootstrap: { replicates: number; level: number; seed: number; used: number; refit: string };
}

const LEVEL = 0.9;

/**
 * Bootstrap replicates by default: 200 up to {@link INDIRECT_LARGE_N} values, 100 above (each
 * replicate refits the model; our stated choice, for speed).
 * @see Efron B, Tibshirani RJ. An Introduction to the Bootstrap, 1993 (a few hundred replicates
 *   for percentile intervals).
 * Complexity O(1). Throws nothing.
 * @example indirectReplicates(100_000) // 100
 */
export function indirectReplicates(n: number): number {
  return n > INDIRECT_LARGE_N ? 100 : 200;
}

function fmt(v: number): string {
  return Number(v.toPrecision(4)).toString();
}

/**
 * Indirect reference interval by truncated maximum likelihood (see
 * {@link truncatedMaximumLikelihood}; cells and censoring in {@link indirectCells}).
 *
 * 90% CIs: a seeded percentile bootstrap (Efron & Tibshirani 1993) over the values, censored
 * ones included (each resample is re-binned on the same cells). To keep 100,000 values within
 * seconds, each replicate refits the chosen truncation interval and its neighbours on the
 * candidate grid (one step either way on each side) from the chosen fit, rather than the whole
 * search (our stated choice; it keeps the interval's choice partly in the resampling); 200
 * replicates, or 100 above 20,000 values, stated in the result.
 *
 * Warnings (Jones et al. 2019 name the conditions; the thresholds are ours): non-diseased
 * fraction below 60%; a truncation end at the edge of its search grid; no interval passing
 * the fit criterion; Bhattacharya (METHODS.md §8.3) disagreeing with TML by more than 15% of
 * the interval's width on either limit, or failing; a limit the model cannot place; censored
 * values (how they were used); the reduced replicate count.
 * @see Arzideh F et al. Clin Chem Lab Med 2007;45:1043–1057; J Lab Med 2009;33:52–66.
 * @see Jones GRD et al. Indirect methods for reference interval determination – review and
 *   recommendations. Clin Chem Lab Med 2019;57:20–29.
 * @see Efron B, Tibshirani RJ. An Introduction to the Bootstrap. Chapman & Hall, 1993.
 * Complexity: one full search (about a hundred interval fits) plus up to 9 fits per replicate.
 * Throws StatsInputError for unusable values (see {@link indirectCells}) or bad options.
 * @example indirectReferenceInterval(values, { seed: 1 }).lower
 */
export function indirectReferenceInterval(values: readonly RoutineValue[], options: IndirectOptions = {}): IndirectEstimate {
  const seed = options.seed ?? INDIRECT_DEFAULT_SEED;
  if (!Number.isSafeInteger(seed)) throw new StatsInputError(`seed must be an integer (got ${seed})`);
  const cells = indirectCells(values);
  const n = cells.n;
  const replicates = options.replicates ?? indirectReplicates(n);
  if (!(replicates === 0 || (Number.isInteger(replicates) && replicates >= 100))) {
    throw new StatsInputError(`replicates must be 0 or an integer of at least 100 (got ${replicates})`);
  }
  const tml = truncatedMaximumLikelihood(cells);
  const warnings: string[] = [];

  let lowerCi: [number, number] | null = null;
  let upperCi: [number, number] | null = null;
  let used = 0;
  if (replicates > 0) {
    const ci = bootstrapLimits(cells, tml, replicates, seed);
    lowerCi = ci.lower;
    upperCi = ci.upper;
    used = ci.used;
  }

  let second: BhattacharyaResult | null = null;
  try {
    second = bhattacharya(cells, tml.lambda);
  } catch (e) {
    if (!(e instanceof StatsInputError)) throw e;
    warnings.push(`Bhattacharya's procedure found no falling straight segment (${e.message}); there is no second opinion.`);
  }

  if (tml.fraction < INDIRECT_MIN_FRACTION) {
    warnings.push(
      `The estimated non-diseased fraction is ${(tml.fraction * 100).toFixed(1)}%, below ${INDIRECT_MIN_FRACTION * 100}%: the data hold too many diseased results for the method to separate them reliably.`,
    );
  }
  if (tml.atSearchEdge.low || tml.atSearchEdge.high) {
    const sides = [tml.atSearchEdge.low ? "lower" : null, tml.atSearchEdge.high ? "upper" : null].filter(Boolean).join(" and ");
    warnings.push(`The truncation interval's ${sides} end lies at the edge of its search: the fit needed the narrowest or the widest interval tried, so the limits may be unreliable.`);
  }
  if (!tml.accepted) {
    warnings.push(
      `No truncation interval passed the χ² goodness-of-fit and plausibility criterion; the best-fitting one was used (χ² = ${fmt(tml.chiSquare)} on ${tml.df} df, p = ${fmt(tml.pValue)}).`,
    );
  }
  if (tml.lower === null || tml.upper === null) {
    warnings.push("The fitted distribution puts a limit where no positive value lies; that limit cannot be given.");
  }
  if (second !== null && tml.lower !== null && tml.upper !== null) {
    const width = tml.upper - tml.lower;
    const off = (a: number | null, b: number) => a === null || Math.abs(a - b) > INDIRECT_DISAGREEMENT * width;
    if (off(second.lower, tml.lower) || off(second.upper, tml.upper)) {
      warnings.push(
        `Bhattacharya's procedure disagrees with the truncated maximum likelihood by more than ${INDIRECT_DISAGREEMENT * 100}% of the interval's width (${second.lower === null ? "none" : fmt(second.lower)}–${second.upper === null ? "none" : fmt(second.upper)} against ${fmt(tml.lower)}–${fmt(tml.upper)}).`,
      );
    }
  }
  if (cells.censoredBelow || cells.censoredAbove) {
    const parts: string[] = [];
    if (cells.censoredBelow) parts.push(`${cells.censoredBelow.count} below ${cells.censoredBelow.limit}`);
    if (cells.censoredAbove) parts.push(`${cells.censoredAbove.count} above ${cells.censoredAbove.limit}`);
    warnings.push(`${parts.join(" and ")} were reported censored; they count in n and in the likelihood of the open end cells, never as numbers.`);
  }
  if (replicates > 0 && replicates < 200) {
    const why = n > INDIRECT_LARGE_N ? ` (200 up to ${INDIRECT_LARGE_N.toLocaleString("en-US")} values; fewer above, to keep the time down)` : "";
    warnings.push(`The 90% CIs come from ${replicates} bootstrap replicates${why}.`);
  }
  if (replicates > 0 && (lowerCi === null || upperCi === null)) {
    warnings.push(`Fewer than half the bootstrap replicates gave a limit (${used} of ${replicates}); a CI could not be given.`);
  }

  return {
    n,
    lower: tml.lower,
    upper: tml.upper,
    lowerCi,
    upperCi,
    lambda: tml.lambda,
    mu: tml.mu,
    sigma: tml.sigma,
    fraction: Math.min(1, tml.fraction),
    fractionEstimate: tml.fraction,
    truncation: tml.truncation,
    chiSquare: tml.chiSquare,
    df: tml.df,
    pValue: tml.pValue,
    accepted: tml.accepted,
    secondOpinion: { method: "bhattacharya", lower: second?.lower ?? null, upper: second?.upper ?? null },
    warnings,
    censored: {
      below: cells.censoredBelow?.count ?? 0,
      belowLimit: cells.censoredBelow?.limit ?? null,
      above: cells.censoredAbove?.count ?? 0,
      aboveLimit: cells.censoredAbove?.limit ?? null,
    },
    cells: { count: cells.counts.length, binWidth: cells.binWidth, resolution: cells.resolution },
    bootstrap: {
      replicates,
      level: LEVEL,
      seed,
      used,
      refit: "each replicate refits the chosen truncation interval and its grid neighbours from the chosen fit",
    },
  };
}

function bootstrapLimits(
  cells: IndirectCells,
  tml: TmlResult,
  replicates: number,
  seed: number,
): { lower: [number, number] | null; upper: [number, number] | null; used: number } {
  const chosen = tml.chosen.candidate;
  const near = tmlCandidates(cells).filter(
    (c) => Math.abs(c.lowStep - chosen.lowStep) <= 1 && Math.abs(c.highStep - chosen.highStep) <= 1,
  );
  const K = cells.counts.length;
  const index = Array.from(cells.cellOf);
  const counts = new Float64Array(K);
  const resampled: IndirectCells = { ...cells, counts };
  const [lo, hi] = percentileBootstrap(
    index,
    (sample) => {
      counts.fill(0);
      for (let i = 0; i < sample.length; i++) counts[sample[i]]++;
      try {
        const r = truncatedMaximumLikelihood(resampled, { candidates: near, start: tml.chosen.scaled, precision: "resample" });
        return [r.lower, r.upper];
      } catch (e) {
        if (e instanceof StatsInputError) return [null, null];
        throw e;
      }
    },
    { replicates, level: LEVEL, seed },
  );
  return {
    lower: lo ? [lo.lower, lo.upper] : null,
    upper: hi ? [hi.lower, hi.upper] : null,
    used: Math.min(lo?.used ?? 0, hi?.used ?? 0),
  };
}
