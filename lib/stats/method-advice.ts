/**
 * Which estimate to put forward for sign-off, and the cautions that go with it.
 */
import { StatsInputError } from "./validate";

export type RecommendedMethod = "nonparametric" | "parametric" | "robust";

export interface LimitsWithCi {
  lower: number | null;
  upper: number | null;
  lowerCi: [number, number] | null;
  upperCi: [number, number] | null;
}

export interface AdviceInput {
  /** Values used after exclusions, in the partition. */
  n: number;
  nonparametric: LimitsWithCi;
  parametric: LimitsWithCi | null;
  robust: LimitsWithCi | null;
  /** p-value of the normality test on the parametric scale (Shapiro-Wilk, else Anderson-Darling). */
  normalityP: number | null;
  /** Share of the n values that are censored ("<LoQ", "> limit"); 0 when absent. */
  censoredFraction?: number;
}

export interface Advice {
  recommended: RecommendedMethod | null;
  warnings: string[];
}

/** Sample size recommended per partition for nonparametric limits (CLSI EP28-A3c, IFCC). */
export const ESTABLISH_N = 120;
/** Fewest values for any establishment (the robust method's lower design limit). */
export const MIN_ESTABLISH_N = 20;
/** A limit's 90% CI should be at most this fraction of the interval width. */
export const CI_WIDTH_RATIO = 0.2;
/** Normality is taken as not rejected at this p-value and above. */
export const NORMALITY_ALPHA = 0.05;
/**
 * Above this share of censored values the parametric and robust fits, which leave them out,
 * describe a truncated sample; only the nonparametric ranks use them.
 */
export const CENSORED_FRACTION_LIMIT = 0.05;

const hasLimits = (l: LimitsWithCi | null): l is LimitsWithCi =>
  l !== null && l.lower !== null && l.upper !== null;

/**
 * Method advice: n ≥ 120 → nonparametric (parametric shown beside it); 20 ≤ n < 120 →
 * parametric after transformation when normality is not rejected (p ≥ 0.05) on that scale,
 * else robust; n < 20 → no establishment, an adoption check instead. With more than 5%
 * censored values (n ≥ 20) → nonparametric whatever n, or nothing when those limits cannot be
 * estimated, with a warning saying why. Adds a warning for each limit of the recommended
 * method whose 90% CI is wider than 0.2 × the interval width.
 * @see CLSI EP28-A3c (2010); Horn PS, Pesce AJ, Copeland BE. Clin Chem 1998;44:622–631;
 *   Braun JP et al. Vet Clin Pathol 2013 and the ASVCP guideline (Friedrichs KR et al. Vet
 *   Clin Pathol 2012;41:441–453) for the 0.2 ratio.
 * Complexity O(1).
 * Throws StatsInputError when n is not a non-negative integer or censoredFraction lies outside [0, 1].
 * @example adviseMethod({ n: 150, nonparametric, parametric, robust: null, normalityP: 0.3 }).recommended
 *   // "nonparametric"
 */
export function adviseMethod(input: AdviceInput): Advice {
  const { n } = input;
  if (!Number.isInteger(n) || n < 0) throw new StatsInputError(`n must be a count (got ${n})`);
  const warnings: string[] = [];
  let recommended: RecommendedMethod | null = null;
  if (n < MIN_ESTABLISH_N) {
    warnings.push(
      `Only ${n} values: too few to establish a reference interval (at least ${MIN_ESTABLISH_N}, ` +
        `${ESTABLISH_N} recommended). Consider an adoption check instead: verify an existing ` +
        `interval with 20 healthy donors, at most 2 outside.`,
    );
    return { recommended: null, warnings };
  }
  const censored = input.censoredFraction ?? 0;
  if (!(censored >= 0 && censored <= 1)) {
    throw new StatsInputError(`censoredFraction must lie in [0, 1] (got ${String(input.censoredFraction)})`);
  }
  if (censored > CENSORED_FRACTION_LIMIT) {
    const share = `${fmt(100 * censored)}% of the values are censored (more than ${100 * CENSORED_FRACTION_LIMIT}%)`;
    if (hasLimits(input.nonparametric)) {
      recommended = "nonparametric";
      warnings.push(
        `${share}: the nonparametric method is advised, because it ranks the censored values and the ` +
          "parametric and robust fits leave them out, which biases them.",
      );
    } else {
      warnings.push(
        `${share}: only the nonparametric method uses them, and it cannot estimate the limits from ${n} values ` +
          "(at least 39); no method is advised.",
      );
      return { recommended: null, warnings };
    }
  } else if (n >= ESTABLISH_N && hasLimits(input.nonparametric)) {
    recommended = "nonparametric";
  } else {
    if (n < ESTABLISH_N) {
      warnings.push(
        `${n} values: fewer than the ${ESTABLISH_N} recommended per partition for nonparametric ` +
          `limits; robust or parametric limits after transformation are advised.`,
      );
    }
    const gaussian = input.normalityP !== null && input.normalityP >= NORMALITY_ALPHA;
    if (gaussian && hasLimits(input.parametric)) recommended = "parametric";
    else if (hasLimits(input.robust)) recommended = "robust";
    else if (hasLimits(input.parametric)) recommended = "parametric";
    if (!gaussian && recommended === "parametric") {
      warnings.push("Normality is rejected on the parametric scale; treat the parametric limits with caution.");
    }
  }
  const chosen =
    recommended === "nonparametric"
      ? input.nonparametric
      : recommended === "parametric"
        ? input.parametric
        : recommended === "robust"
          ? input.robust
          : null;
  if (chosen && hasLimits(chosen)) {
    const width = chosen.upper! - chosen.lower!;
    for (const [name, ci] of [
      ["lower", chosen.lowerCi],
      ["upper", chosen.upperCi],
    ] as const) {
      if (ci === null) {
        warnings.push(`No 90% CI is available for the ${name} limit of the ${recommended} method.`);
      } else if (ci[1] - ci[0] > CI_WIDTH_RATIO * width) {
        warnings.push(
          `The 90% CI of the ${name} limit (${fmt(ci[0])} to ${fmt(ci[1])}) is wider than ` +
            `${CI_WIDTH_RATIO} × the interval width (${fmt(width)}): the limit is imprecise; ` +
            `more reference values would narrow it.`,
        );
      }
    }
  }
  return { recommended, warnings };
}

function fmt(v: number): string {
  return Number(v.toPrecision(5)).toString();
}
