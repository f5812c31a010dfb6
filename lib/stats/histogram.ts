import normal from "@stdlib/stats-base-dists-normal";
import { boxCoxOfValue } from "./box-cox";
import { valueAtRank } from "./quantile";
import { assertFiniteSample, assertPositiveSample, StatsInputError } from "./validate";

export type HistogramTransform = "none" | "ln" | "box-cox";

export interface HistogramBin {
  /** Inclusive lower edge. */
  lower: number;
  /** Exclusive upper edge, except the last bin, which includes its upper edge. */
  upper: number;
  count: number;
  /** Count expected in this bin under the fitted normal, n·(F(upper) − F(lower)). */
  expected: number;
}

export interface Histogram {
  n: number;
  rule: "freedman-diaconis" | "sturges";
  binWidth: number;
  bins: HistogramBin[];
  /** The fitted normal: mean and SD (n − 1) of the values on the transformed scale. */
  fit: { transform: HistogramTransform; lambda: number | null; mean: number; sd: number };
  /** The fitted density on the raw scale, scaled to counts (n · binWidth · f(x)), for drawing. */
  curve: { x: number; y: number }[];
}

export interface HistogramOptions {
  /** Scale on which the normal is fitted; the bins stay on the raw scale (default "none"). */
  transform?: HistogramTransform;
  /** Box-Cox lambda, required with transform "box-cox". */
  lambda?: number;
  /** Upper bound on the number of bins (default 60). */
  maxBins?: number;
  /** Number of evenly spaced curve points over the binned range (default 101). */
  curvePoints?: number;
  /** Evaluate the curve at these x instead of the evenly spaced points. */
  curveAt?: readonly number[];
}

/** Type-7 quantile (R's default, used by R's IQR and nclass.FD) of sorted values: rank 1 + p(n − 1). */
function quantile7(sorted: Float64Array, p: number): number {
  return valueAtRank(sorted, 1 + p * (sorted.length - 1)) as number;
}

/**
 * Histogram with the fitted normal density, for judging a reference sample's shape.
 *
 * Bin rule: Freedman-Diaconis, width 2·IQR·n^(−1/3) with the IQR from type-7 quartiles, giving
 * k = ⌈range/width⌉ bins as R's `nclass.FD`; when the IQR is 0 (heavily tied data), Sturges'
 * k = ⌈log₂ n⌉ + 1. k is capped at `maxBins`, and the bins split [min, max] into k equal parts.
 *
 * The normal is fitted on the chosen scale (raw, ln, or Box-Cox with the given λ); its expected
 * count per bin and its density (with the Jacobian x^(λ−1), or 1/x for ln) are returned on the
 * raw scale, so a skewed sample is shown in its own units beside the curve it was fitted with.
 *
 * @see Freedman D, Diaconis P. On the histogram as a density estimator: L2 theory.
 *   Z Wahrscheinlichkeitstheorie verw Gebiete 1981;57:453–476.
 * @see Sturges HA. The choice of a class interval. J Am Stat Assoc 1926;21:65–66.
 * @param x the sample on the raw scale (at least 2 finite values, not all equal; positive for
 *   ln and Box-Cox)
 * @param options transform, lambda, maxBins, curvePoints, curveAt
 * @returns bins with observed and expected counts, the rule used, the fit and the density curve
 * @throws StatsInputError for fewer than 2 values, a non-finite value, all values equal,
 *   a value ≤ 0 under ln or Box-Cox, a missing lambda, or a bad option
 * Complexity: O(n log n) time for the sort, O(n + k) memory.
 * @example
 * histogram([148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236]).bins.length; // → 6
 */
export function histogram(x: readonly number[], options: HistogramOptions = {}): Histogram {
  const transform = options.transform ?? "none";
  assertFiniteSample(x, "values", 2);
  if (transform !== "none") assertPositiveSample(x, "values");
  if (transform === "box-cox" && (typeof options.lambda !== "number" || !Number.isFinite(options.lambda))) {
    throw new StatsInputError("a Box-Cox histogram needs lambda, a finite number");
  }
  const maxBins = options.maxBins ?? 60;
  if (!Number.isInteger(maxBins) || maxBins < 1) {
    throw new StatsInputError(`maxBins must be a positive integer (got ${maxBins})`);
  }
  const curvePoints = options.curvePoints ?? 101;
  if (!Number.isInteger(curvePoints) || curvePoints < 2) {
    throw new StatsInputError(`curvePoints must be an integer of at least 2 (got ${curvePoints})`);
  }

  const n = x.length;
  const sorted = Float64Array.from(x).sort();
  const min = sorted[0];
  const max = sorted[n - 1];
  const range = max - min;
  if (!(range > 0)) throw new StatsInputError("a histogram needs spread in the values: all values are equal");

  const iqr = quantile7(sorted, 0.75) - quantile7(sorted, 0.25);
  const rule: Histogram["rule"] = iqr > 0 ? "freedman-diaconis" : "sturges";
  const k0 = rule === "freedman-diaconis" ? Math.ceil(range / (2 * iqr * Math.cbrt(1 / n))) : Math.ceil(Math.log2(n)) + 1;
  const k = Math.min(Math.max(k0, 1), maxBins);
  const width = range / k;
  const edge = (j: number) => (j === k ? max : min + j * width);

  const counts = new Array<number>(k).fill(0);
  for (let i = 0; i < n; i++) {
    const v = sorted[i];
    let j = Math.min(Math.floor((v - min) / width), k - 1);
    // Rounding in (v − min)/width can land an edge value one bin off; edges belong to the upper bin.
    while (j > 0 && v < edge(j)) j--;
    while (j < k - 1 && v >= edge(j + 1)) j++;
    counts[j]++;
  }

  const lambda = transform === "box-cox" ? (options.lambda as number) : transform === "ln" ? 0 : 1;
  const g = transform === "none" ? (v: number) => v : (v: number) => boxCoxOfValue(v, lambda);
  const dg = transform === "none" ? () => 1 : (v: number) => v ** (lambda - 1);
  let mean = 0;
  for (let i = 0; i < n; i++) mean += g(sorted[i]);
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (g(sorted[i]) - mean) ** 2;
  const sd = Math.sqrt(ss / (n - 1));
  const cdf = (v: number) => normal.cdf(g(v), mean, sd);

  const bins: HistogramBin[] = counts.map((count, j) => ({
    lower: edge(j),
    upper: edge(j + 1),
    count,
    expected: n * (cdf(edge(j + 1)) - cdf(edge(j))),
  }));
  const at = options.curveAt ?? Array.from({ length: curvePoints }, (_, i) => min + (i * range) / (curvePoints - 1));
  const curve = at.map((v) => ({
    x: v,
    y: transform !== "none" && v <= 0 ? 0 : n * width * normal.pdf(g(v), mean, sd) * dg(v),
  }));

  return {
    n,
    rule,
    binWidth: width,
    bins,
    fit: { transform, lambda: transform === "box-cox" ? lambda : null, mean, sd },
    curve,
  };
}
