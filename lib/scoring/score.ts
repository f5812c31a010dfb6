import normal from "@stdlib/stats-base-dists-normal";
import { boxCoxOfValue } from "../stats/box-cox";
import { rankType6 } from "../stats/quantile";
import { lmsAt, type LmsModel } from "../stats/lms-model";
import { lmsCentile, lmsZ } from "../stats/lms-z";
import { assertFiniteNumber, StatsInputError } from "../stats/validate";
import {
  FLAG_ONLY_CAUTION,
  GENERAL_CAUTION,
  limitsAtAgeCaution,
  limitUndefinedAtAgeCaution,
  LIMITS_ONLY_CAUTION,
  INDIRECT_ESTIMATE_CAUTION,
  outsideReferenceDataCaution,
  partitionCaution,
  REVIEW_OVERDUE_CAUTION,
  tailExtrapolatedCaution,
  unitConvertedCaution,
  valueCensoredCaution,
  zUndefinedCaution,
  type Caution,
  type PartitionChoice,
} from "./cautions";
import { empiricalRank, indexEmpirical, type EmpiricalIndex } from "./empirical";
import { flagCensored, flagValue, type Flag } from "./flag";
import { gaussianTransform } from "./gaussian";
import { obx7, obx8 } from "./hl7";
import type { ScoringPartition } from "./model";
import { zlog } from "./zlog";

export interface ScoreInput {
  /** The partition that applies, already validated with scoringPartitionSchema. */
  partition: ScoringPartition;
  /** The value in the partition's unit (after any conversion). */
  value: number;
  /** "<" or ">" when the result is outside the measuring range and `value` is that limit. */
  censored?: "<" | ">" | null;
  /** Set when the value was converted to the partition's unit; `from` names the unit sent. */
  unitConverted?: { from?: string } | null;
  reviewOverdue?: boolean;
  /** How the partition was picked: by the sex/age given, or the default for lack of them. */
  partitionChosenBy?: PartitionChoice | null;
  /** The patient's exact age in years: required by an lms model, ignored by the others. */
  ageYears?: number | null;
}

/** LMS curves at one exact age: L, M, S and the limits there (null where a centile is undefined). */
export interface LmsAtAge {
  ageYears: number;
  L: number;
  M: number;
  S: number;
  /** The 2.5th centile at this age; null where 1 + L·S·z ≤ 0 (no value has that z). */
  low: number | null;
  /** The 97.5th centile at this age; null likewise. */
  high: number | null;
}

export interface Score {
  /** Null for a limits-only (flag-only) model. */
  z: number | null;
  percentile: number | null;
  /** Non-null when the percentile (and z) is only a bound: the true value is further out. */
  percentileBound: "below" | "above" | null;
  flag: Flag;
  hl7: { obx7: string; obx8: string };
  cautions: Caution[];
  /** For an lms model: the curves at the patient's age, whose limits the flag used; else null. */
  lms: LmsAtAge | null;
}

/** z, percentile and bound of one value, without flag or cautions: the fast path. */
export interface ModelScore {
  z: number;
  percentile: number;
  bound: "below" | "above" | null;
}

// Standard-normal Φ and Φ⁻¹ from @stdlib, bound once: the batch path calls them per value.
const phi = normal.cdf.factory(0, 1);
const phiInverse = normal.quantile.factory(0, 1);

/**
 * The LMS curves at an exact age: L, M and S (lmsAt) and the reference limits there, the 2.5th
 * and 97.5th centiles (the same arithmetic as lmsCentileAt), null where 1 + L·S·z ≤ 0.
 *
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; METHODS.md §9.
 * @throws StatsInputError for an age that is not finite or lies outside [ageMin, ageMax]
 * Complexity: O(1).
 * @example
 * lmsLimitsAt(model, 4.5); // → { ageYears: 4.5, L, M, S, low: 98.1…, high: 262.1… }
 */
export function lmsLimitsAt(model: LmsModel, ageYears: number): LmsAtAge {
  const p = lmsAt(model, ageYears);
  return { ageYears, L: p.L, M: p.M, S: p.S, low: lmsCentile(p, 2.5), high: lmsCentile(p, 97.5) };
}

function lmsNeedsAge(): never {
  throw new StatsInputError("this partition's limits follow age curves (LMS): the patient's exact age is needed to score a value");
}

function flagOnly(): never {
  throw new StatsInputError("this partition's model gives a flag only (a one-sided interval): it has no z-score or percentile");
}

// Per n, so that a batch does not compute the same Φ⁻¹ once per value.
const reachOfN = new Map<number, number>();

/** Largest |z| that the reference data themselves reach: Φ⁻¹(n/(n+1)), or 3 without n. */
function dataReach(n: number | undefined): number {
  if (n === undefined) return 3;
  let reach = reachOfN.get(n);
  if (reach === undefined) {
    reach = normal.quantile(n / (n + 1), 0, 1);
    if (reachOfN.size < 10_000) reachOfN.set(n, reach);
  }
  return reach;
}

// A partition's OBX-7 string depends on the partition alone: formatted once per partition object.
const obx7OfPartition = new WeakMap<ScoringPartition, string>();

function obx7Of(partition: ScoringPartition): string {
  let text = obx7OfPartition.get(partition);
  if (text === undefined) {
    text = obx7(partition.low, partition.high, partition.decimals);
    obx7OfPartition.set(partition, text);
  }
  return text;
}

/**
 * Prepare a partition's model once and return a function that scores one value against it.
 * Gaussian: z = (g(x) − mean)/sd, percentile = 100·Φ(z). Empirical: the inverse type-6 quantile
 * (see scoreEmpirical), with bounds outside the data. zlog: z from the partition's limits
 * (lib/scoring/zlog.ts). A limits-only model has no z: asking for a scorer throws.
 *
 * @see CLSI EP28-A3c (2010); Hyndman RJ, Fan Y. Am Stat 1996;50:361–365 (definition 6).
 * @param partition a validated partition
 * @returns a scorer; it throws StatsInputError for a non-finite value or a value ≤ 0 under
 *   ln, Box-Cox or log-scale zlog
 * @throws StatsInputError for a limits-only model
 * Complexity: O(n) to prepare an empirical model, then O(1) (gaussian) or O(log n) per value.
 * @example
 * const score = createScorer(partition); score(4.9); // → { z, percentile, bound }
 */
export function createScorer(partition: ScoringPartition): (x: number) => ModelScore {
  const model = partition.model;
  if (model.kind === "gaussian") {
    const g = gaussianTransform(model);
    const { mean, sd } = model;
    return (x) => {
      assertFiniteNumber(x, "value");
      const z = (g(x) - mean) / sd;
      return { z, percentile: 100 * normal.cdf(z, 0, 1), bound: null };
    };
  }
  if (model.kind === "zlog") {
    const { low, high } = partition;
    if (low === null || high === null) throw new StatsInputError("a zlog model needs both limits");
    return (x) => ({ ...zlog(x, low, high, { scale: model.scale }), bound: null });
  }
  if (model.kind === "limits") flagOnly();
  if (model.kind === "lms") lmsNeedsAge();
  const idx: EmpiricalIndex = indexEmpirical(model);
  return (x) => {
    assertFiniteNumber(x, "value");
    const { rank, bound } = empiricalRank(idx, x);
    const p = rank / (idx.n + 1);
    return { z: normal.quantile(p, 0, 1), percentile: 100 * p, bound };
  };
}

/**
 * Score many values against one partition's model into typed arrays, for batch requests and
 * the benchmark. A value that cannot be scored (non-finite, or ≤ 0 under ln/Box-Cox) gets NaN
 * and its index is listed in `invalid`; the rest are unaffected.
 *
 * @see createScorer for the method.
 * @param partition a validated partition
 * @param values the values in the partition's unit
 * @returns z and percentile arrays, bound codes (−1 below, 1 above, 0 none) and invalid indexes
 * Complexity: O(m) for a gaussian model, O(n + m log n) for an empirical one, m values.
 * @example
 * scoreMany(partition, [4.1, 5.6]).z; // → Float64Array [0.5, 3.25]
 */
export function scoreMany(
  partition: ScoringPartition,
  values: ArrayLike<number>,
): { z: Float64Array; percentile: Float64Array; bound: Int8Array; invalid: number[] } {
  const m = values.length;
  const z = new Float64Array(m);
  const percentile = new Float64Array(m);
  const bound = new Int8Array(m);
  const invalid: number[] = [];
  const model = partition.model;
  if (model.kind === "lms") lmsNeedsAge();
  if (model.kind === "gaussian") {
    const { mean, sd } = model;
    // ln is Box-Cox with λ = 0.
    const lambda = model.transform === "box-cox" ? (model.lambda as number) : 0;
    const raw = model.transform === "none";
    for (let i = 0; i < m; i++) {
      const x = values[i];
      if (!Number.isFinite(x) || (!raw && !(x > 0))) {
        z[i] = NaN;
        percentile[i] = NaN;
        invalid.push(i);
        continue;
      }
      const g = raw ? x : boxCoxOfValue(x, lambda);
      const zi = (g - mean) / sd;
      z[i] = zi;
      percentile[i] = 100 * phi(zi);
    }
  } else if (model.kind === "zlog" || model.kind === "limits") {
    const scorer = createScorer(partition);
    for (let i = 0; i < m; i++) {
      try {
        const s = scorer(values[i]);
        z[i] = s.z;
        percentile[i] = s.percentile;
      } catch (err) {
        if (!(err instanceof StatsInputError)) throw err;
        z[i] = NaN;
        percentile[i] = NaN;
        invalid.push(i);
      }
    }
  } else {
    // The bound is read from the ends here rather than through empiricalRank, so that no
    // result object is made per value.
    const idx = indexEmpirical(model);
    const lowest = idx.distinct[0];
    const highest = idx.distinct[idx.distinct.length - 1];
    const n = idx.n;
    for (let i = 0; i < m; i++) {
      const x = values[i];
      if (!Number.isFinite(x)) {
        z[i] = NaN;
        percentile[i] = NaN;
        invalid.push(i);
        continue;
      }
      bound[i] = x < lowest ? -1 : x > highest ? 1 : 0;
      const p = rankType6(idx, x) / (n + 1);
      z[i] = phiInverse(p);
      percentile[i] = 100 * p;
    }
  }
  return { z, percentile, bound, invalid };
}

/**
 * Score one patient value against a partition: z-score, percentile (with a bound outside
 * empirical data or for a censored value), the L/H/N flag (LL/HH only from configured critical
 * limits), HL7 OBX-7/OBX-8 strings, and the cautions: always the general one, plus those that
 * apply (tail extrapolated or outside the reference data, unit converted, value censored,
 * review overdue, how the partition was chosen).
 *
 * @see CLSI EP28-A3c (2010); HL7 v2.5 Chapter 7 (OBX-7, OBX-8, Table 0078).
 * @param input the partition, the value and its circumstances
 * @returns the score, in full precision (formatting is the caller's)
 * @throws StatsInputError for a non-finite value, or a value ≤ 0 under ln or Box-Cox
 * Complexity: as createScorer, plus O(n) to index an empirical model (reuse createScorer for
 *   many values).
 * @example
 * scoreValue({ partition, value: 5.4 }).flag; // → "H"
 */
export function scoreValue(input: ScoreInput, scorer?: (x: number) => ModelScore): Score {
  const { partition, value } = input;
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new StatsInputError(`value must be a finite number (got ${String(value)})`);
  }
  const model = partition.model;
  if (model.kind === "lms") return scoreLms(input, model);
  const s: ModelScore =
    model.kind === "limits" ? { z: NaN, percentile: NaN, bound: null } : (scorer ?? createScorer(partition))(value);
  const censored = input.censored ?? null;
  const limits = {
    low: partition.low,
    high: partition.high,
    criticalLow: partition.criticalLow,
    criticalHigh: partition.criticalHigh,
  };
  const flag = censored ? flagCensored(censored, value, limits) : flagValue(value, limits);

  const cautions: Caution[] = [GENERAL_CAUTION];
  let percentileBound = s.bound;
  if (model.kind === "limits") {
    cautions.push(FLAG_ONLY_CAUTION);
  } else if (model.kind === "zlog") {
    cautions.push(LIMITS_ONLY_CAUTION);
  } else if (s.bound !== null && model.kind === "empirical") {
    cautions.push(outsideReferenceDataCaution(s.bound, s.percentile, model.values.length));
  } else if (model.kind === "gaussian" && Math.abs(s.z) > dataReach(partition.n)) {
    cautions.push(tailExtrapolatedCaution(s.z, partition.n));
  }
  if (model.kind === "gaussian" && model.source === "indirect") cautions.push(INDIRECT_ESTIMATE_CAUTION);
  if (censored) {
    // "<c": the true value is below c, so its percentile is below the one computed at c.
    if (model.kind !== "limits") percentileBound = censored === "<" ? "below" : "above";
    cautions.push(valueCensoredCaution(censored, value, partition.unit));
  }
  if (input.unitConverted) cautions.push(unitConvertedCaution(input.unitConverted.from, partition.unit));
  if (input.reviewOverdue) cautions.push(REVIEW_OVERDUE_CAUTION);
  if (input.partitionChosenBy) cautions.push(partitionCaution(input.partitionChosenBy));

  const flagOnlyModel = model.kind === "limits";
  return {
    z: flagOnlyModel ? null : s.z,
    percentile: flagOnlyModel ? null : s.percentile,
    percentileBound,
    flag,
    hl7: { obx7: obx7Of(partition), obx8: obx8(flag) },
    cautions,
    lms: null,
  };
}

/**
 * Score against LMS curves at the patient's exact age (METHODS.md §9): L, M and S there, z =
 * ((x/M)^L − 1)/(L·S) (ln(x/M)/S for L = 0), percentile 100·Φ(z), and the flag against the
 * 2.5th and 97.5th centiles at that age. A limit that is undefined at this age (1 + L·S·z ≤ 0)
 * leaves its side open, and a value ≤ 0 has no z: both are said in a caution, never clamped.
 */
function scoreLms(input: ScoreInput, model: LmsModel): Score {
  const { partition, value } = input;
  const ageYears = input.ageYears ?? null;
  if (ageYears === null) lmsNeedsAge();
  const at = lmsLimitsAt(model, ageYears);
  const censored = input.censored ?? null;
  const limits = { low: at.low, high: at.high, criticalLow: partition.criticalLow, criticalHigh: partition.criticalHigh };
  const flag = censored ? flagCensored(censored, value, limits) : flagValue(value, limits);

  const cautions: Caution[] = [GENERAL_CAUTION, limitsAtAgeCaution(ageYears)];
  const undefinedSides = [...(at.low === null ? ["lower" as const] : []), ...(at.high === null ? ["upper" as const] : [])];
  if (undefinedSides.length > 0) cautions.push(limitUndefinedAtAgeCaution(undefinedSides, ageYears));
  let z: number | null = null;
  let percentile: number | null = null;
  let percentileBound: "below" | "above" | null = null;
  if (value > 0) {
    z = lmsZ(at, value);
    percentile = 100 * phi(z);
    if (Math.abs(z) > dataReach(partition.n)) cautions.push(tailExtrapolatedCaution(z, partition.n));
  } else {
    cautions.push(zUndefinedCaution(value, partition.unit));
  }
  if (censored) {
    if (z !== null) percentileBound = censored === "<" ? "below" : "above";
    cautions.push(valueCensoredCaution(censored, value, partition.unit));
  }
  if (input.unitConverted) cautions.push(unitConvertedCaution(input.unitConverted.from, partition.unit));
  if (input.reviewOverdue) cautions.push(REVIEW_OVERDUE_CAUTION);
  if (input.partitionChosenBy) cautions.push(partitionCaution(input.partitionChosenBy));
  return {
    z,
    percentile,
    percentileBound,
    flag,
    hl7: { obx7: obx7(at.low, at.high, partition.decimals), obx8: obx8(flag) },
    cautions,
    lms: at,
  };
}
