import normal from "@stdlib/stats-base-dists-normal";
import { meanAndSdOfChecked } from "./descriptive";
import { assertFiniteSample, StatsInputError } from "./validate";

export interface QqPoint {
  /** Standard normal score for this rank, Φ⁻¹((rank − 3/8)/(n + 1/4)). */
  theoretical: number;
  /** The value of this rank in the sorted sample. */
  sample: number;
  /** 1-based rank in the full sorted sample. */
  rank: number;
}

export interface QqPlot {
  n: number;
  points: QqPoint[];
  /** True when the middle of the sample was thinned to keep the payload small. */
  thinned: boolean;
  /** Reference line of the fitted normal: sample = intercept + slope · theoretical (mean, SD). */
  line: { intercept: number; slope: number };
}

export interface QqPlotOptions {
  /** Largest number of points returned (default 500, at least 10). */
  maxPoints?: number;
  /** Points kept in full at each end when thinning (default 10, at most a quarter of maxPoints). */
  tailPoints?: number;
}

/**
 * Normal quantile-quantile plot coordinates: the sorted sample against Blom's plotting
 * positions (i − 3/8)/(n + 1/4), the same scores Shapiro-Wilk uses. (R's `qqnorm` uses Blom only
 * for n ≤ 10 and (i − 1/2)/n above; the difference is invisible on a chart.)
 *
 * For a large sample the chart payload is bounded: the `tailPoints` most extreme values at each
 * end are kept (the tails are where departures from normality matter for reference limits),
 * and the middle is sampled at evenly spaced ranks. Theoretical scores always use the full n.
 *
 * @see Blom G. Statistical Estimates and Transformed Beta-Variables. Wiley, 1958.
 * @see Wilk MB, Gnanadesikan R. Probability plotting methods for the analysis of data.
 *   Biometrika 1968;55:1–17.
 * @param x the sample (at least 2 finite values), on the scale to be judged (raw, ln or Box-Cox)
 * @param options maxPoints and tailPoints for thinning
 * @returns points sorted by rank, whether they were thinned, and the fitted-normal line
 * @throws StatsInputError for fewer than 2 values, a non-finite value, or a bad option
 * Complexity: O(n log n) time for the sort, O(n) memory.
 * @example
 * normalQqPlot([5, 1, 4, 2, 3]).points[0]; // → { theoretical: -1.1798, sample: 1, rank: 1 }
 */
export function normalQqPlot(x: readonly number[], options: QqPlotOptions = {}): QqPlot {
  assertFiniteSample(x, "values", 2);
  const maxPoints = options.maxPoints ?? 500;
  if (!Number.isInteger(maxPoints) || maxPoints < 10) {
    throw new StatsInputError(`maxPoints must be an integer of at least 10 (got ${maxPoints})`);
  }
  const tailRequested = options.tailPoints ?? 10;
  if (!Number.isInteger(tailRequested) || tailRequested < 0) {
    throw new StatsInputError(`tailPoints must be a non-negative integer (got ${tailRequested})`);
  }
  const n = x.length;
  const sorted = Float64Array.from(x).sort();

  const { mean, sd } = meanAndSdOfChecked(sorted);

  const ranks = selectRanks(n, maxPoints, Math.min(tailRequested, Math.floor(maxPoints / 4)));
  const points = ranks.map((rank) => ({
    theoretical: normal.quantile((rank - 0.375) / (n + 0.25), 0, 1),
    sample: sorted[rank - 1],
    rank,
  }));
  return { n, points, thinned: ranks.length < n, line: { intercept: mean, slope: sd } };
}

function selectRanks(n: number, maxPoints: number, tail: number): number[] {
  if (n <= maxPoints) return Array.from({ length: n }, (_, i) => i + 1);
  const ranks: number[] = [];
  for (let r = 1; r <= tail; r++) ranks.push(r);
  const middle = maxPoints - 2 * tail;
  const from = tail + 1;
  const to = n - tail;
  // Evenly spaced over [from, to]; n > maxPoints makes the spacing > 1, so ranks stay distinct.
  for (let k = 0; k < middle; k++) {
    ranks.push(middle === 1 ? from : Math.round(from + (k * (to - from)) / (middle - 1)));
  }
  for (let r = n - tail + 1; r <= n; r++) ranks.push(r);
  return ranks;
}
