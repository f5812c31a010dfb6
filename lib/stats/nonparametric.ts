/**
 * Nonparametric reference limits: the 2.5th and 97.5th percentiles by the rank rule p(n + 1),
 * with 90% confidence intervals from binomial order-statistic ranks (n ≥ 119) or, below that,
 * from a seeded percentile bootstrap, labelled as such.
 */
import { percentileBootstrap } from "./bootstrap";
import { assertSorted, quantileType6OfSorted } from "./quantile";
import { binomialRankCi } from "./rank-ci";

/** Fewest values for a point estimate of the 2.5th percentile: 0.025·(n + 1) ≥ 1. */
export const NONPARAMETRIC_MIN_N = 39;

export type CiMethod = "binomial-ranks" | "bootstrap" | null;

export interface NonparametricLimits {
  lower: number | null;
  upper: number | null;
  lowerCi: [number, number] | null;
  upperCi: [number, number] | null;
  ciMethod: CiMethod;
}

export interface NonparametricOptions {
  /** Seed of the bootstrap (used only when n < 119); default 1. */
  seed?: number;
  /** Bootstrap replicates; default 1000. */
  replicates?: number;
}

const P_LOW = 0.025;
const P_HIGH = 0.975;

function limitsOfSorted(sorted: ArrayLike<number>): [number | null, number | null] {
  return [quantileType6OfSorted(sorted, P_LOW), quantileType6OfSorted(sorted, P_HIGH)];
}

/**
 * Nonparametric 95% reference limits (type-6 quantiles, rank p(n + 1)) of values sorted
 * ascending, with 90% CIs. Below 39 values nothing is estimable (all null). From 119 values
 * the CIs are the equal-tail binomial order-statistic intervals; from 39 to 118 they are
 * seeded percentile-bootstrap intervals (ciMethod says which).
 * @see Solberg HE (IFCC). Approved recommendation (1987) on the theory of reference values,
 *   part 5. J Clin Chem Clin Biochem 1987;25:645–656; CLSI EP28-A3c (2010); Reed AH et al.
 *   Clin Chem 1971;17:275–284; Linnet K. Clin Chem 2000;46:867–869 (bootstrap).
 * Complexity O(n) for n ≥ 119 (the order check); O(B·n) for the bootstrap below that.
 * Throws StatsInputError on an empty, unsorted or non-finite array.
 * @example nonparametricLimits(Array.from({ length: 120 }, (_, i) => i + 1))
 *   // { lower: 3.025, upper: 117.975, lowerCi: [1, 7], upperCi: [114, 120], ciMethod: "binomial-ranks" }
 */
export function nonparametricLimits(
  sorted: readonly number[],
  options: NonparametricOptions = {},
): NonparametricLimits {
  assertSorted(sorted);
  const len = sorted.length;
  if (len < NONPARAMETRIC_MIN_N) {
    return { lower: null, upper: null, lowerCi: null, upperCi: null, ciMethod: null };
  }
  const [lower, upper] = limitsOfSorted(sorted);
  const ranks = binomialRankCi(len, P_LOW, 0.9);
  if (ranks !== null) {
    return {
      lower,
      upper,
      lowerCi: [sorted[ranks.lower[0] - 1], sorted[ranks.lower[1] - 1]],
      upperCi: [sorted[ranks.upper[0] - 1], sorted[ranks.upper[1] - 1]],
      ciMethod: "binomial-ranks",
    };
  }
  const [lo, hi] = percentileBootstrap(
    sorted,
    (resample) => limitsOfSorted(Float64Array.from(resample).sort()),
    { seed: options.seed ?? 1, replicates: options.replicates ?? 1000, level: 0.9 },
  );
  return {
    lower,
    upper,
    lowerCi: lo ? [lo.lower, lo.upper] : null,
    upperCi: hi ? [hi.lower, hi.upper] : null,
    ciMethod: lo || hi ? "bootstrap" : null,
  };
}
