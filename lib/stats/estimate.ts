/**
 * The estimate of one partition: outlier screen, choice of scale, nonparametric, parametric
 * and robust limits with 90% CIs, normality on the parametric scale, and method advice. This
 * is the document stored with an estimate and printed by `bellwether estimate`.
 */
import { andersonDarlingSorted } from "./anderson-darling";
import { boxCoxFitFromTable, boxCoxLogLikFromTable, boxCoxOfLog, logTableOfSorted } from "./box-cox";
import { chooseScaleFromTable, type ScaleChoice } from "./box-cox-lrt";
import { adviseMethod, type LimitsWithCi, type RecommendedMethod } from "./method-advice";
import { nonparametricLimits } from "./nonparametric";
import { nonparametricLimitsCensored, type CensoredBound } from "./nonparametric-censored";
import { screenOutliers, type OutlierScreenResult } from "./outlier-screen";
import type { OutlierEvidence, OutlierMethod } from "./outliers";
import { parametricFromScale, type Transform } from "./parametric";
import {
  C_LOCATION,
  C_SCALE,
  MAD_NORMAL,
  ROBUST_MAX_N,
  ROBUST_MIN_N,
  robustReferenceLimits,
} from "./robust-horn";
import { shapiroWilk } from "./shapiro-wilk";
import { assertFiniteSample, StatsInputError } from "./validate";

export type OutlierOption = "none" | "dixon" | "tukey" | "horn";

/**
 * A donor result known only to lie beyond a limit: "<0.5" (below a limit of quantitation) is
 * `{ value: 0.5, side: "below" }`, ">1000" is `{ value: 1000, side: "above" }`.
 */
export interface CensoredValue {
  value: number;
  side: "below" | "above";
}

/** One donor result as the estimate takes it: a measured number or a censored value. */
export type DonorValue = number | CensoredValue;
export type TransformOption = "auto" | Transform;
/** "propose": the screen only proposes; "apply": its proposals are left out of the limits. */
export type ScreeningMode = "propose" | "apply";

export const OUTLIER_OPTIONS: readonly OutlierOption[] = ["none", "dixon", "tukey", "horn"];
export const TRANSFORM_OPTIONS: readonly TransformOption[] = ["auto", "none", "ln", "box-cox"];
export const SCREENING_MODES: readonly ScreeningMode[] = ["propose", "apply"];
export const DEFAULT_SEED = 1;
/** Resamples of every bootstrap CI in the document (nonparametric below 119 values, robust). */
export const BOOTSTRAP_REPLICATES = 1000;
/** Shapiro-Wilk (Royston) is defined up to this many values. */
const SHAPIRO_MAX_N = 5000;

export interface EstimateOptions {
  /** Outlier screen; default "horn". */
  outliers?: OutlierOption;
  /**
   * What the screen's proposals do; default "propose" (listed, nothing excluded: the scientist
   * confirms exclusions and removes them before calling). "apply" excludes them.
   */
  screening?: ScreeningMode;
  /** Scale of the parametric and robust methods; default "auto". */
  transform?: TransformOption;
  /** Seed of every bootstrap; default 1. Store it with the estimate. */
  seed?: number;
}

/** A value the outlier screen proposed, with the rule and its statistic. */
export interface Exclusion {
  value: number;
  /** The rule that proposed it. */
  reason: OutlierMethod;
  /** Position of the value in the values given. */
  index: number;
  /** The rule's finding in words a scientist can check by hand. */
  explanation: string;
  /** The same finding as numbers: D/R against 1/3, the Tukey fences, or Horn's λ and fences. */
  evidence: OutlierEvidence;
}

export interface ScreeningSection {
  /** The screen asked for. */
  outliers: OutlierOption;
  /** The rule that ran: Tukey on the raw scale when Horn met a non-positive value; null if none. */
  rule: OutlierMethod | null;
  mode: ScreeningMode;
  /** True when the screen's proposals were left out of the limits (mode "apply"). */
  applied: boolean;
  /** Values given, before any exclusion. */
  valuesGiven: number;
}

/** Who computed the document: filled in outside lib/stats (lib/engine.ts), null here. */
export interface EngineIdentity {
  name: string;
  /** The package version. */
  version: string;
  /** The git commit of the code, where known. */
  commit: string | null;
  /** True when the working tree differed from that commit; null when not known. */
  uncommittedChanges: boolean | null;
}

/** Everything besides the values needed to compute the same document again. */
export interface Provenance {
  /** The options as applied, defaults filled in. */
  options: { outliers: OutlierOption; screening: ScreeningMode; transform: TransformOption; seed: number };
  bootstrap: {
    method: "percentile";
    generator: "xoshiro128**";
    replicates: number;
    level: number;
    /** The sections whose CIs came from the bootstrap in this document. */
    usedFor: ("nonparametric" | "robust")[];
  };
  /** The robust method's tuning constants (see lib/stats/robust-horn.ts). */
  robust: { method: "Horn-Pesce-Copeland 1998, biweight"; madNormal: number; cLocation: number; cScale: number };
  engine: EngineIdentity | null;
}

export interface ParametricSection extends LimitsWithCi {
  transform: Transform;
  lambda: number | null;
  /** Mean and SD on the transformed scale. */
  mean: number | null;
  sd: number | null;
  /** The likelihood-ratio tests behind the "auto" scale; null when the scale was given or
   * could not be tested (a non-positive value, fewer than 3 values, all values equal). */
  scaleChoice: ScaleChoice | null;
}

export interface NormalitySection {
  shapiroWilk: { w: number; p: number } | null;
  andersonDarling: { a2: number; p: number } | null;
}

/**
 * The nonparametric limits and, where a rank fell on a censored value, which numbers are
 * bounds: "<" means the true value lies below the number given, ">" above it. All null when no
 * value is censored.
 */
export interface NonparametricSection extends LimitsWithCi {
  lowerCensored: CensoredBound | null;
  upperCensored: CensoredBound | null;
  lowerCiCensored: [CensoredBound | null, CensoredBound | null] | null;
  upperCiCensored: [CensoredBound | null, CensoredBound | null] | null;
}

/** How many of the values used were censored, and their share of n. */
export interface CensoredSection {
  below: number;
  above: number;
  /** (below + above)/n. */
  fraction: number;
}

export interface ReferenceIntervalEstimate {
  /** Values used after exclusions, censored values included. */
  n: number;
  excluded: Exclusion[];
  nonparametric: NonparametricSection;
  parametric: ParametricSection;
  robust: LimitsWithCi;
  normality: NormalitySection;
  recommended: RecommendedMethod | null;
  warnings: string[];
  /** Every value the screen proposed, whatever the mode, in the order given. */
  proposed: Exclusion[];
  screening: ScreeningSection;
  provenance: Provenance;
  /** Censored values among those used: they count in n and in the nonparametric ranks only. */
  censored: CensoredSection;
}

const EMPTY: LimitsWithCi = { lower: null, upper: null, lowerCi: null, upperCi: null };

/** A plain array of a typed array's values: Array.from goes through the iterator, far slower. */
function plainArray(x: Float64Array): number[] {
  const out = new Array<number>(x.length);
  for (let i = 0; i < x.length; i++) out[i] = x[i];
  return out;
}

function scaleOf(sorted: readonly number[], logs: Float64Array | null, t: Transform, lambda: number | null): number[] {
  if (t === "none") return sorted as number[];
  if (t === "ln") return plainArray(logs!);
  const l = lambda as number;
  if (l === 0) return plainArray(logs!);
  const y = new Array<number>(sorted.length);
  for (let i = 0; i < y.length; i++) y[i] = boxCoxOfLog(logs![i], l);
  return y;
}

interface SplitSample {
  /** The measured values: `values` itself when nothing is censored. */
  measured: readonly number[];
  /** Position in the values given of each measured value; null when nothing is censored. */
  positions: number[] | null;
  below: number[];
  above: number[];
}

/** Separates measured from censored values, checking each. */
function splitCensored(values: readonly DonorValue[]): SplitSample {
  if (!Array.isArray(values)) throw new StatsInputError("values must be an array of numbers");
  let plain = true;
  for (let i = 0; i < values.length && plain; i++) if (typeof values[i] !== "number") plain = false;
  if (plain) {
    assertFiniteSample(values as readonly number[]);
    return { measured: values as readonly number[], positions: null, below: [], above: [] };
  }
  const measured: number[] = [];
  const positions: number[] = [];
  const below: number[] = [];
  const above: number[] = [];
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (typeof v === "number") {
      if (!Number.isFinite(v)) throw new StatsInputError(`values[${i}] is not a finite number (${String(v)})`);
      measured.push(v);
      positions.push(i);
    } else if (
      v !== null && typeof v === "object" && typeof v.value === "number" && Number.isFinite(v.value) &&
      (v.side === "below" || v.side === "above")
    ) {
      (v.side === "below" ? below : above).push(v.value);
    } else {
      throw new StatsInputError(
        `values[${i}] must be a finite number or a censored value { value, side: "below" | "above" } (got ${JSON.stringify(v)})`,
      );
    }
  }
  return { measured, positions, below, above };
}

function tryOr<T>(f: () => T, fallback: T): T {
  try {
    return f();
  } catch (e) {
    if (e instanceof StatsInputError) return fallback;
    throw e;
  }
}

/**
 * Estimates the 95% reference interval of one partition by every applicable method.
 *
 * Each value is a measured number or a censored value `{ value, side }` ("<0.5" is
 * `{ value: 0.5, side: "below" }`). Censored values count in n and in the nonparametric ranks
 * (below, or above, every measured value; see nonparametric-censored.ts), where a limit or CI end
 * that falls on one is a bound flagged "<" or ">" in `nonparametric.lowerCensored` and the like.
 * Everything else (the outlier screen, the scale, the parametric and robust limits, normality)
 * uses the measured values only, with a warning giving how many were left out; `censored`
 * counts them. Above 5% censored the advice is nonparametric. Plain number arrays work as before.
 *
 * 1. Outliers: the chosen screen (Horn by default; Tukey on the raw scale when a value is not
 *    positive) proposes values, listed in `proposed` with the rule's statistic. With screening
 *    "propose" (the default) nothing is excluded; with "apply" they are left out and also
 *    listed in `excluded`.
 * 2. Scale ("auto"): raw unless a likelihood-ratio test of the Box-Cox λ = 1 against the
 *    maximum-likelihood λ̂ on [−3, 3] rejects at 5%, then ln unless the test rejects λ = 0,
 *    else Box-Cox with λ̂ (box-cox-lrt.ts); the tests go into `parametric.scaleChoice`. Data
 *    with a value that is not positive stay raw, with a warning; so does a λ̂ on the edge of
 *    its range.
 * 3. Nonparametric limits on the raw values (rank p(n + 1)), CIs from binomial ranks (n ≥ 119)
 *    or a seeded bootstrap (39–118, said in `warnings`).
 * 4. Parametric limits on the chosen scale; robust limits on the same scale for 20–119 values.
 * 5. Normality, judged after the choice on the chosen scale: Shapiro-Wilk (3–5000 values),
 *    Anderson-Darling (≥ 8); null outside those ranges.
 * 6. Method advice and warnings.
 * The same values, options and seed always give the same document; `provenance` records the
 * options, seed, bootstrap size and robust constants (the caller adds the engine's identity).
 * @see lib/stats/* for each method and its source; CLSI EP28-A3c (2010).
 * Complexity O(n log n): one sort; the λ search is O(n) per evaluation; bootstraps only below
 *   120 values.
 * Throws StatsInputError on an empty sample, a non-finite value, a malformed censored value, an
 *   unknown option, or ln / Box-Cox requested for data with a non-positive measured value.
 * @example estimateReferenceInterval(values, { outliers: "horn", screening: "propose", transform: "auto", seed: 1 })
 * @example estimateReferenceInterval([{ value: 0.5, side: "below" }, 0.8, 1.1, …]).nonparametric.lowerCensored // "<" or null
 */
export function estimateReferenceInterval(
  given: readonly DonorValue[],
  options: EstimateOptions = {},
): ReferenceIntervalEstimate {
  const { measured: values, positions, below, above } = splitCensored(given);
  const nCensored = below.length + above.length;
  const outlierOption = options.outliers ?? "horn";
  const screeningMode = options.screening ?? "propose";
  const transformOption = options.transform ?? "auto";
  const seed = options.seed ?? DEFAULT_SEED;
  if (!OUTLIER_OPTIONS.includes(outlierOption)) {
    throw new StatsInputError(`outliers must be one of ${OUTLIER_OPTIONS.join(", ")} (got "${String(outlierOption)}")`);
  }
  if (!SCREENING_MODES.includes(screeningMode)) {
    throw new StatsInputError(`screening must be one of ${SCREENING_MODES.join(", ")} (got "${String(screeningMode)}")`);
  }
  if (!TRANSFORM_OPTIONS.includes(transformOption)) {
    throw new StatsInputError(`transform must be one of ${TRANSFORM_OPTIONS.join(", ")} (got "${String(transformOption)}")`);
  }
  if (!Number.isSafeInteger(seed)) throw new StatsInputError(`seed must be an integer (got ${String(seed)})`);
  const warnings: string[] = [];
  let allPositive = true;
  for (let i = 0; i < values.length; i++) if (values[i] <= 0) allPositive = false;
  const apply = screeningMode === "apply";

  // 1. Outliers. Horn's screen works on the one sort of the data; its kept values are a
  // contiguous run of it. The screens see the measured values only: a censored value has no
  // number to test.
  let hornLambda: number | null = null;
  let sortedKept: Float64Array;
  const screen: OutlierScreenResult =
    outlierOption === "none" ? { rule: null, proposals: [], horn: null, warnings: [] } : screenOutliers(values, outlierOption);
  const { rule, proposals } = screen;
  warnings.push(...screen.warnings);
  if (screen.horn) {
    const { sorted: all, screen: h } = screen.horn;
    const keptAll = h.from === 0 && h.to === all.length;
    sortedKept = apply ? all.subarray(h.from, h.to) : all;
    // The screen's last λ̂ is that of its kept values: reusable when those are the values used.
    if (h.converged && (apply || keptAll)) hornLambda = h.lambda;
  } else {
    const excludedIdx = new Uint8Array(values.length);
    if (apply) for (const p of proposals) excludedIdx[p.index] = 1;
    const kept = new Float64Array(values.length - (apply ? proposals.length : 0));
    for (let i = 0, j = 0; i < values.length; i++) if (!excludedIdx[i]) kept[j++] = values[i];
    sortedKept = kept.sort();
  }
  const proposed: Exclusion[] = proposals.map((p) => ({
    value: p.value,
    reason: p.method,
    index: positions === null ? p.index : positions[p.index],
    explanation: p.reason,
    evidence: p.evidence,
  }));
  const excluded: Exclusion[] = apply ? proposed.slice() : [];
  if (!apply && proposed.length > 0) {
    warnings.push(
      `The ${rule === "dixon" ? "Dixon/Reed" : rule === "tukey" ? "Tukey" : "Horn"} screen proposes ` +
        `${proposed.length} value${proposed.length === 1 ? "" : "s"} for exclusion; ` +
        "they are included in these limits until an exclusion is confirmed.",
    );
  }
  const sorted = plainArray(sortedKept);
  const n = sorted.length;
  const distinct = n >= 2 && sorted[n - 1] > sorted[0];

  // 2. Scale
  let logs: Float64Array | null = null;
  if (allPositive && n > 0) {
    // A plain loop: TypedArray.from with a map function is many times slower.
    logs = new Float64Array(n);
    for (let i = 0; i < n; i++) logs[i] = Math.log(sorted[i]);
  }
  let lambda: number | null = null;
  let transform: Transform = transformOption === "auto" ? "none" : transformOption;
  let scaleChoice: ScaleChoice | null = null;
  if ((transformOption === "ln" || transformOption === "box-cox") && !allPositive) {
    throw new StatsInputError(`transform "${transformOption}" needs every value to be positive`);
  }
  if (transformOption === "auto" && !allPositive) {
    warnings.push("Some values are not positive, so the parametric scale stays raw: ln and Box-Cox need positive values.");
  }
  const needBoxCox = transformOption === "box-cox" || (transformOption === "auto" && allPositive && n >= 3);
  if (needBoxCox && distinct && logs) {
    const table = logTableOfSorted(sorted);
    // From 4 kept values on, Horn's converged screen fitted its last λ̂ on exactly the values
    // kept (its last round removed nothing), so that fit is reused.
    const fit =
      hornLambda === null || n < 4
        ? boxCoxFitFromTable(table)
        : { lambda: hornLambda, logLik: boxCoxLogLikFromTable(table, hornLambda) };
    lambda = fit.lambda;
    const atEdge = Math.abs(lambda) === 3;
    if (transformOption === "auto") {
      const chosen = chooseScaleFromTable(table, fit);
      transform = chosen.transform;
      scaleChoice = chosen.scaleChoice;
      if (atEdge) {
        warnings.push(
          `The Box-Cox λ reached the edge of its search range (${lambda}); the likelihood-ratio tests of the scale used that edge value.`,
        );
      }
    } else if (atEdge) {
      warnings.push(`The Box-Cox λ reached the edge of its search range (${lambda}).`);
    }
  }
  if (transform !== "box-cox") lambda = null;
  const y = n > 0 && (transform === "none" || logs) ? scaleOf(sorted, logs, transform, lambda) : null;

  // 3. Nonparametric, on the raw values; censored values take the lowest or highest ranks
  const nAll = n + nCensored;
  let nonparametric: NonparametricSection;
  let npBootstrap = false;
  if (nCensored === 0) {
    const np = nonparametricLimits(sorted, { seed, replicates: BOOTSTRAP_REPLICATES });
    npBootstrap = np.ciMethod === "bootstrap";
    if (npBootstrap) {
      warnings.push(`Nonparametric 90% CIs are percentile-bootstrap intervals (fewer than 119 values; seed ${seed}).`);
    }
    nonparametric = {
      lower: np.lower, upper: np.upper, lowerCi: np.lowerCi, upperCi: np.upperCi,
      lowerCensored: null, upperCensored: null, lowerCiCensored: null, upperCiCensored: null,
    };
  } else {
    nonparametric = nonparametricLimitsCensored(below, sorted, above);
    if (nAll >= 39 && nAll < 119) {
      warnings.push(`Nonparametric 90% CIs are not given: with censored values they need at least 119 values (have ${nAll}).`);
    }
    for (const [name, flag, value] of [
      ["lower", nonparametric.lowerCensored, nonparametric.lower],
      ["upper", nonparametric.upperCensored, nonparametric.upper],
    ] as const) {
      if (flag !== null && value !== null) {
        warnings.push(`The nonparametric ${name} limit falls on a censored value: it is only known to be ${flag} ${fmt(value)}.`);
      }
    }
  }
  if (nAll < 39) warnings.push(`Nonparametric limits need at least 39 values (have ${nAll}).`);
  if (nCensored > 0) {
    warnings.push(
      `${nCensored} censored value${nCensored === 1 ? "" : "s"} (${below.length} below a limit, ${above.length} above) ` +
        `${nCensored === 1 ? "is" : "are"} counted in the nonparametric ranks but left out of the parametric and robust limits, ` +
        "the outlier screen and the normality tests.",
    );
  }

  // 4. Parametric and robust, on the chosen scale
  let parametric: ParametricSection = { transform, lambda, mean: null, sd: null, ...EMPTY, scaleChoice };
  if (y !== null && n >= 3 && distinct) {
    const p = parametricFromScale(y, transform, lambda);
    parametric = { transform, lambda, mean: p.mean, sd: p.sd, lower: p.lower, upper: p.upper, lowerCi: p.lowerCi, upperCi: p.upperCi, scaleChoice };
    if (p.lower === null || p.upper === null) {
      warnings.push("A parametric limit cannot be carried back from the Box-Cox scale (1 + λy ≤ 0).");
    }
    if (transform === "none" && allPositive && p.lower !== null && p.lower < 0) {
      warnings.push("The raw-scale parametric lower limit is negative although every value is positive.");
    }
  } else if (n < 3) {
    warnings.push(`Parametric limits need at least 3 values (have ${n}).`);
  } else {
    warnings.push("All values are equal: parametric and robust limits cannot be estimated.");
  }
  let robust: LimitsWithCi = EMPTY;
  if (n >= ROBUST_MIN_N && n <= ROBUST_MAX_N && distinct) {
    robust = robustReferenceLimits(sorted, {
      transform,
      lambda,
      seed,
      replicates: BOOTSTRAP_REPLICATES,
      cLocation: C_LOCATION,
      cScale: C_SCALE,
    });
  }

  // 5. Normality, judged on the scale chosen above
  const normality: NormalitySection = { shapiroWilk: null, andersonDarling: null };
  if (y !== null && distinct) {
    const yy = y;
    if (n >= 3 && n <= SHAPIRO_MAX_N) normality.shapiroWilk = tryOr(() => shapiroWilk(yy), null);
    if (n >= 8) {
      // y is the sorted sample under an increasing transform, so it is still in order.
      const ad = tryOr(() => andersonDarlingSorted(yy), null);
      normality.andersonDarling = ad && { a2: ad.a2, p: ad.p };
    }
  }

  // 6. Advice
  const advice = adviseMethod({
    n: nAll,
    censoredFraction: nCensored / nAll,
    nonparametric,
    parametric: parametric.mean === null ? null : parametric,
    robust: robust.lower === null && robust.upper === null ? null : robust,
    normalityP: normality.shapiroWilk?.p ?? normality.andersonDarling?.p ?? null,
  });
  return {
    n: nAll,
    excluded,
    nonparametric,
    parametric,
    robust,
    normality,
    recommended: advice.recommended,
    warnings: [...warnings, ...advice.warnings],
    proposed,
    screening: { outliers: outlierOption, rule, mode: screeningMode, applied: apply && rule !== null, valuesGiven: given.length },
    provenance: {
      options: { outliers: outlierOption, screening: screeningMode, transform: transformOption, seed },
      bootstrap: {
        method: "percentile",
        generator: "xoshiro128**",
        replicates: BOOTSTRAP_REPLICATES,
        level: 0.9,
        usedFor: [
          ...(npBootstrap ? (["nonparametric"] as const) : []),
          ...(robust.lowerCi !== null || robust.upperCi !== null ? (["robust"] as const) : []),
        ],
      },
      robust: { method: "Horn-Pesce-Copeland 1998, biweight", madNormal: MAD_NORMAL, cLocation: C_LOCATION, cScale: C_SCALE },
      engine: null,
    },
    censored: { below: below.length, above: above.length, fraction: nCensored / nAll },
  };
}

function fmt(v: number): string {
  return Number(v.toPrecision(5)).toString();
}
