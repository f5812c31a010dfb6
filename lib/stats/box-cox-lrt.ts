/**
 * The likelihood-ratio test of a Box-Cox λ, and the choice of the parametric scale it drives:
 * raw unless the test rejects λ = 1, then ln unless it rejects λ = 0, else Box-Cox with λ̂.
 */
import chisquare from "@stdlib/stats-base-dists-chisquare";
import normal from "@stdlib/stats-base-dists-normal";
import {
  boxCoxFitFromTable,
  boxCoxLogLikFromTable,
  logTableOfSorted,
  type BoxCoxFit,
  type LogTable,
} from "./box-cox";
import { assertFiniteNumber, assertFiniteSample, assertPositiveSample, StatsInputError } from "./validate";

/** χ²₁,0.95 = 3.841459, from @stdlib: the 5% critical value of a 1-df likelihood-ratio test. */
export const CHI_SQUARE_1_95 = chisquare.quantile(0.95, 1);

export interface LikelihoodRatioTest {
  /** 2·(ℓ(λ̂) − ℓ(λ0)), 0 or more. */
  statistic: number;
  /** P(χ²₁ > statistic). */
  p: number;
}

/** What the automatic choice of scale rests on; recorded in the estimate document. */
export interface ScaleChoice {
  /** The maximum-likelihood λ on [−3, 3]. */
  lambdaHat: number;
  /** The test of λ = 1 (the raw scale, up to a shift) against λ̂. */
  lrtAgainstRaw: LikelihoodRatioTest;
  /** The test of λ = 0 (the ln scale) against λ̂. */
  lrtAgainstLn: LikelihoodRatioTest;
}

export interface ChosenScale {
  transform: "none" | "ln" | "box-cox";
  /** λ̂ when the choice is Box-Cox, else null. */
  lambda: number | null;
  /** True when λ̂ lies on an end of its search range, [−3, 3]. */
  atBoundary: boolean;
  scaleChoice: ScaleChoice;
}

function lrt(table: LogTable, fit: Pick<BoxCoxFit, "lambda" | "logLik">, lambda0: number): LikelihoodRatioTest {
  // λ̂ is a maximum, so the statistic is ≥ 0 but for rounding.
  const statistic = Math.max(0, 2 * (fit.logLik - boxCoxLogLikFromTable(table, lambda0)));
  // χ²₁ is Z², so P(χ²₁ > s) = 2·Φ(−√s): exact, and no underflow to 0 for large s.
  return { statistic, p: 2 * normal.cdf(-Math.sqrt(statistic), 0, 1) };
}

/**
 * The scale choice on a log table (positive values, at least two distinct; not re-checked),
 * given the maximum-likelihood fit of λ on it.
 * @see {@link chooseScale}
 * Complexity O(d) for d distinct values: two likelihood evaluations. Throws nothing.
 * @example chooseScaleFromTable(table, boxCoxFitFromTable(table)).transform // "ln"
 */
export function chooseScaleFromTable(table: LogTable, fit: Pick<BoxCoxFit, "lambda" | "logLik">): ChosenScale {
  const lrtAgainstRaw = lrt(table, fit, 1);
  const lrtAgainstLn = lrt(table, fit, 0);
  const transform =
    lrtAgainstRaw.statistic <= CHI_SQUARE_1_95 ? "none" : lrtAgainstLn.statistic <= CHI_SQUARE_1_95 ? "ln" : "box-cox";
  return {
    transform,
    lambda: transform === "box-cox" ? fit.lambda : null,
    atBoundary: fit.lambda === -3 || fit.lambda === 3,
    scaleChoice: { lambdaHat: fit.lambda, lrtAgainstRaw, lrtAgainstLn },
  };
}

function checkedTable(x: readonly number[]): LogTable {
  assertFiniteSample(x, "values", 3);
  assertPositiveSample(x);
  const table = logTableOfSorted(Float64Array.from(x).sort());
  if (table.logs.length < 2) throw new StatsInputError("Box-Cox needs at least two different values");
  return table;
}

/**
 * Box-Cox likelihood-ratio test of λ = λ0: 2·(ℓ(λ̂) − ℓ(λ0)) with ℓ the profile
 * log-likelihood (Jacobian included) and λ̂ its maximum on [−3, 3], referred to χ²₁.
 * @see Box GEP, Cox DR. An analysis of transformations. J R Stat Soc B 1964;26:211–252
 *   (the likelihood-ratio confidence region for λ).
 * Complexity O(n log n) for the sort, then O(d) per likelihood evaluation.
 * Throws StatsInputError on fewer than 3 values, a non-positive or non-finite value, values
 *   that are all equal, or a non-finite λ0.
 * @example boxCoxLrt([2.1, 2.9, 3.2, 3.8, 4.4, 5.0, 5.9, 7.3, 9.6, 14.2], 1).statistic // 5.1616…
 */
export function boxCoxLrt(x: readonly number[], lambda0: number): LikelihoodRatioTest & { lambdaHat: number } {
  assertFiniteNumber(lambda0, "lambda0");
  const table = checkedTable(x);
  const fit = boxCoxFitFromTable(table);
  return { ...lrt(table, fit, lambda0), lambdaHat: fit.lambda };
}

/**
 * Bellwether's automatic parametric scale: raw unless the Box-Cox likelihood-ratio test
 * rejects λ = 1 at 5% (2·(ℓ(λ̂) − ℓ(1)) > χ²₁,0.95), then ln unless it rejects λ = 0, else
 * Box-Cox with λ̂. The simpler scale is kept unless the data speak against it, so a flat
 * likelihood (Gaussian data far from zero, λ̂ anywhere in [−3, 3]) stays raw.
 * @see Box GEP, Cox DR. J R Stat Soc B 1964;26:211–252; DESIGN.md (statistics conventions).
 * Complexity O(n log n) for the sort, then O(d) per likelihood evaluation, d distinct values.
 * Throws StatsInputError on fewer than 3 values, a non-positive or non-finite value, or
 *   values that are all equal.
 * @example chooseScale(lognormalValues).transform // "ln"
 */
export function chooseScale(x: readonly number[]): ChosenScale {
  const table = checkedTable(x);
  return chooseScaleFromTable(table, boxCoxFitFromTable(table));
}
