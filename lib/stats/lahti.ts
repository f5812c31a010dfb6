import normal from "@stdlib/stats-base-dists-normal";
import { mean, sampleSd } from "./descriptive";
import { quantileType6 } from "./quantile";
import { assertFiniteNumber, assertFiniteSample, StatsInputError } from "./validate";

/** Partition when any subgroup has more than this percentage outside a combined limit. */
export const LAHTI_PARTITION_ABOVE_PERCENT = 4.1;
/** Combine when every subgroup has at most this percentage outside each combined limit. */
export const LAHTI_COMBINE_AT_OR_BELOW_PERCENT = 3.2;

export interface LahtiSubgroupResult {
  label: string;
  n: number | null;
  belowLowerPercent: number;
  aboveUpperPercent: number;
}

export interface LahtiResult {
  method: "empirical" | "gaussian";
  verdict: "partition" | "combine" | "marginal";
  /** The combined-sample 2.5th and 97.5th percentiles. */
  combinedLimits: { lower: number; upper: number };
  subgroups: LahtiSubgroupResult[];
  thresholds: { partitionAbovePercent: number; combineAtOrBelowPercent: number };
  reasons: string[];
}

export interface LahtiGaussianModel {
  label: string;
  mean: number;
  sd: number;
  /** Relative prevalence of the subgroup in the population served (any positive scale). */
  weight: number;
}

export interface LahtiOptions {
  /** "empirical" proportions of the values (default) or "gaussian" model proportions. */
  method?: "empirical" | "gaussian";
  /** Gaussian method only: subgroup prevalences for the combined distribution (default the n's). */
  prevalences?: readonly number[];
}

function verdictOf(subgroups: LahtiSubgroupResult[]): Pick<LahtiResult, "verdict" | "reasons"> {
  let worst = { percent: -1, label: "", side: "" };
  const over: string[] = [];
  for (const s of subgroups) {
    for (const [percent, side, limit] of [
      [s.belowLowerPercent, "below", "lower"],
      [s.aboveUpperPercent, "above", "upper"],
    ] as const) {
      if (percent > worst.percent) worst = { percent, label: s.label, side };
      if (percent > LAHTI_PARTITION_ABOVE_PERCENT) {
        over.push(
          `${s.label} has ${percent.toFixed(2)}% ${side} the combined ${limit} limit, more than ${LAHTI_PARTITION_ABOVE_PERCENT}%`,
        );
      }
    }
  }
  if (over.length > 0) return { verdict: "partition", reasons: over };
  if (worst.percent <= LAHTI_COMBINE_AT_OR_BELOW_PERCENT) {
    return {
      verdict: "combine",
      reasons: [
        `every subgroup has at most ${LAHTI_COMBINE_AT_OR_BELOW_PERCENT}% outside each combined limit (largest ${worst.percent.toFixed(2)}%)`,
      ],
    };
  }
  const limit = worst.side === "below" ? "lower" : "upper";
  return {
    verdict: "marginal",
    reasons: [
      `the largest proportion, ${worst.percent.toFixed(2)}% of ${worst.label} ${worst.side} the ` +
        `combined ${limit} limit, lies between ${LAHTI_COMBINE_AT_OR_BELOW_PERCENT}% and ` +
        `${LAHTI_PARTITION_ABOVE_PERCENT}%: the decision rests on clinical and non-statistical judgement`,
    ],
  };
}

/** p-quantile of a weighted normal mixture, by bisection (the CDF is monotone). */
function mixtureQuantile(models: readonly LahtiGaussianModel[], total: number, p: number): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (const m of models) {
    lo = Math.min(lo, m.mean - 12 * m.sd);
    hi = Math.max(hi, m.mean + 12 * m.sd);
  }
  const cdf = (x: number) => {
    let s = 0;
    for (const m of models) s += m.weight * normal.cdf(x, m.mean, m.sd);
    return s / total - p;
  };
  for (let i = 0; i < 200 && hi - lo > 1e-14 * Math.max(1, Math.abs(lo), Math.abs(hi)); i++) {
    const mid = (lo + hi) / 2;
    if (cdf(mid) < 0) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Lahti's proportion criteria for partitioning, with Gaussian subgroup models: the combined
 * reference limits are the 2.5th and 97.5th percentiles of the prevalence-weighted mixture of
 * the subgroup normals, and each subgroup's percentages below and above them are
 * 100·Φ((LRL − μ)/σ) and 100·(1 − Φ((URL − μ)/σ)). Partition if any percentage exceeds 4.1%,
 * combine if all are at most 3.2%, otherwise marginal (judgement).
 * Models must be on the scale where the subgroups are Gaussian (transform first).
 *
 * @see Lahti A, Hyltoft Petersen P, Boyd JC, Fraser CG, Jørgensen N. Objective criteria for
 *   partitioning Gaussian-distributed reference values into subgroups. Clin Chem 2002;48:338–352.
 * @see Lahti A et al. Partitioning of nongaussian-distributed biochemical reference data into
 *   subgroups. Clin Chem 2004;50:891–900.
 * @param models at least two subgroups {label, mean, sd > 0, weight > 0}
 * @returns verdict, combined limits, per-subgroup percentages, thresholds and reasons
 * @throws StatsInputError for fewer than 2 subgroups, a non-finite mean, or a non-positive sd
 *   or weight
 * Complexity: O(k) per bisection step, O(k) memory, for k subgroups.
 * @example
 * lahtiGaussian([
 *   { label: "men", mean: 0, sd: 1, weight: 1 },
 *   { label: "women", mean: 0.5, sd: 1, weight: 1 },
 * ]).verdict; // → "marginal" (3.84% of men below the combined lower limit)
 */
export function lahtiGaussian(models: readonly LahtiGaussianModel[]): LahtiResult {
  if (!Array.isArray(models) || models.length < 2) {
    throw new StatsInputError(`Lahti needs at least 2 subgroups (got ${Array.isArray(models) ? models.length : 0})`);
  }
  let total = 0;
  for (const m of models) {
    assertFiniteNumber(m.mean, `subgroup ${m.label}: mean`);
    for (const key of ["sd", "weight"] as const) {
      const v = m[key];
      if (typeof v !== "number" || !Number.isFinite(v) || v <= 0) {
        throw new StatsInputError(`subgroup ${m.label}: ${key} must be a positive number (got ${v})`);
      }
    }
    total += m.weight;
  }
  const lower = mixtureQuantile(models, total, 0.025);
  const upper = mixtureQuantile(models, total, 0.975);
  const subgroups = models.map((m) => ({
    label: m.label,
    n: null,
    belowLowerPercent: 100 * normal.cdf(lower, m.mean, m.sd),
    aboveUpperPercent: 100 * normal.cdf(-upper, -m.mean, m.sd),
  }));
  return {
    method: "gaussian",
    combinedLimits: { lower, upper },
    subgroups,
    thresholds: thresholds(),
    ...verdictOf(subgroups),
  };
}

function thresholds() {
  return {
    partitionAbovePercent: LAHTI_PARTITION_ABOVE_PERCENT,
    combineAtOrBelowPercent: LAHTI_COMBINE_AT_OR_BELOW_PERCENT,
  };
}

/**
 * Lahti's proportion criteria for partitioning, from the subgroups' values.
 *
 * - "empirical" (default): the combined limits are the type-6 2.5th and 97.5th percentiles of the
 *   pooled values (at least 39 in all); each subgroup's percentages count its values strictly
 *   below the lower and strictly above the upper limit (a value equal to a limit is inside, as
 *   limits are inclusive everywhere in Bellwether). The pooled sample stands for the combined
 *   population as sampled; for other prevalences use the gaussian method.
 * - "gaussian": each subgroup is summarised by its mean and n − 1 SD and passed to
 *   {@link lahtiGaussian}, weighted by `prevalences` or by the subgroup sizes.
 *
 * @see Lahti A, Hyltoft Petersen P, Boyd JC, Fraser CG, Jørgensen N. Objective criteria for
 *   partitioning Gaussian-distributed reference values into subgroups. Clin Chem 2002;48:338–352.
 * @see Lahti A et al. Partitioning of nongaussian-distributed biochemical reference data into
 *   subgroups. Clin Chem 2004;50:891–900.
 * @param groups at least two {label, values}; values finite, at least 2 per subgroup
 * @param options method and (gaussian only) prevalences
 * @returns verdict, combined limits, per-subgroup percentages, thresholds and reasons
 * @throws StatsInputError for fewer than 2 subgroups, a subgroup with fewer than 2 values or a
 *   non-finite value, fewer than 39 pooled values (empirical), or bad prevalences
 * Complexity: O(N log N) for the pooled sort (empirical), O(N) for the gaussian method.
 * @example
 * lahti([{ label: "men", values: men }, { label: "women", values: women }]).verdict;
 */
export function lahti(
  groups: readonly { label: string; values: readonly number[] }[],
  options: LahtiOptions = {},
): LahtiResult {
  if (!Array.isArray(groups) || groups.length < 2) {
    throw new StatsInputError(`Lahti needs at least 2 subgroups (got ${Array.isArray(groups) ? groups.length : 0})`);
  }
  for (const g of groups) assertFiniteSample(g.values, `subgroup ${g.label}`, 2);
  const method = options.method ?? "empirical";

  if (method === "gaussian") {
    const prevalences = options.prevalences ?? groups.map((g) => g.values.length);
    if (
      prevalences.length !== groups.length ||
      prevalences.some((p) => typeof p !== "number" || !Number.isFinite(p) || p <= 0)
    ) {
      throw new StatsInputError(`prevalences must give one positive weight per subgroup (${groups.length})`);
    }
    const result = lahtiGaussian(
      groups.map((g, i) => ({ label: g.label, mean: mean(g.values), sd: sampleSd(g.values), weight: prevalences[i] })),
    );
    result.subgroups.forEach((s, i) => (s.n = groups[i].values.length));
    return result;
  }
  if (method !== "empirical") {
    throw new StatsInputError(`method must be "empirical" or "gaussian" (got ${String(method)})`);
  }

  const pooled = groups.flatMap((g) => g.values).sort((a, b) => a - b);
  if (pooled.length < 39) {
    throw new StatsInputError(
      `empirical combined limits need at least 39 values in all (got ${pooled.length}); use the gaussian method or collect more`,
    );
  }
  const lower = quantileType6(pooled, 0.025) as number;
  const upper = quantileType6(pooled, 0.975) as number;
  const subgroups = groups.map((g) => {
    let below = 0;
    let above = 0;
    for (const v of g.values) {
      if (v < lower) below++;
      else if (v > upper) above++;
    }
    const n = g.values.length;
    return { label: g.label, n, belowLowerPercent: (100 * below) / n, aboveUpperPercent: (100 * above) / n };
  });
  return {
    method: "empirical",
    combinedLimits: { lower, upper },
    subgroups,
    thresholds: thresholds(),
    ...verdictOf(subgroups),
  };
}
