import normal from "@stdlib/stats-base-dists-normal";
import { assertFiniteNumber, StatsInputError } from "../stats/validate";
import {
  GENERAL_CAUTION,
  outsideReferenceDataCaution,
  partitionCaution,
  REVIEW_OVERDUE_CAUTION,
  tailExtrapolatedCaution,
  unitConvertedCaution,
  valueCensoredCaution,
  type Caution,
  type PartitionChoice,
} from "./cautions";
import { empiricalRank, indexEmpirical, type EmpiricalIndex } from "./empirical";
import { flagCensored, flagValue, type Flag } from "./flag";
import { gaussianTransform } from "./gaussian";
import { obx7, obx8 } from "./hl7";
import type { ScoringPartition } from "./model";

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
}

export interface Score {
  z: number;
  percentile: number;
  /** Non-null when the percentile (and z) is only a bound: the true value is further out. */
  percentileBound: "below" | "above" | null;
  flag: Flag;
  hl7: { obx7: string; obx8: string };
  cautions: Caution[];
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

/** Largest |z| that the reference data themselves reach: Φ⁻¹(n/(n+1)), or 3 without n. */
function dataReach(n: number | undefined): number {
  return n === undefined ? 3 : normal.quantile(n / (n + 1), 0, 1);
}

/**
 * Prepare a partition's model once and return a function that scores one value against it.
 * Gaussian: z = (g(x) − mean)/sd, percentile = 100·Φ(z). Empirical: the inverse type-6 quantile
 * (see scoreEmpirical), with bounds outside the data.
 *
 * @see CLSI EP28-A3c (2010); Hyndman RJ, Fan Y. Am Stat 1996;50:361–365 (definition 6).
 * @param partition a validated partition
 * @returns a scorer; it throws StatsInputError for a non-finite value or a value ≤ 0 under
 *   ln or Box-Cox
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
  if (model.kind === "gaussian") {
    const { mean, sd } = model;
    const lambda = model.transform === "box-cox" ? (model.lambda as number) : 0;
    const kind = model.transform === "none" ? 0 : lambda === 0 ? 1 : 2;
    for (let i = 0; i < m; i++) {
      const x = values[i];
      if (!Number.isFinite(x) || (kind !== 0 && !(x > 0))) {
        z[i] = NaN;
        percentile[i] = NaN;
        invalid.push(i);
        continue;
      }
      const g = kind === 0 ? x : kind === 1 ? Math.log(x) : Math.expm1(lambda * Math.log(x)) / lambda;
      const zi = (g - mean) / sd;
      z[i] = zi;
      percentile[i] = 100 * phi(zi);
    }
  } else {
    // empiricalRank inlined, without a result object per value.
    const { distinct, first, last, n } = indexEmpirical(model);
    const top = distinct.length - 1;
    for (let i = 0; i < m; i++) {
      const x = values[i];
      if (!Number.isFinite(x)) {
        z[i] = NaN;
        percentile[i] = NaN;
        invalid.push(i);
        continue;
      }
      let rank: number;
      if (x < distinct[0]) {
        rank = 1;
        bound[i] = -1;
      } else if (x > distinct[top]) {
        rank = n;
        bound[i] = 1;
      } else {
        let lo = 0;
        let hi = top;
        while (lo < hi) {
          const mid = (lo + hi + 1) >> 1;
          if (distinct[mid] <= x) lo = mid;
          else hi = mid - 1;
        }
        rank =
          distinct[lo] === x
            ? (first[lo] + last[lo]) / 2
            : last[lo] + (x - distinct[lo]) / (distinct[lo + 1] - distinct[lo]);
      }
      const p = rank / (n + 1);
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
  const s = (scorer ?? createScorer(partition))(value);
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
  const model = partition.model;
  if (s.bound !== null && model.kind === "empirical") {
    cautions.push(outsideReferenceDataCaution(s.bound, s.percentile, model.values.length));
  } else if (model.kind === "gaussian" && Math.abs(s.z) > dataReach(partition.n)) {
    cautions.push(tailExtrapolatedCaution(s.z, partition.n));
  }
  if (censored) {
    // "<c": the true value is below c, so its percentile is below the one computed at c.
    percentileBound = censored === "<" ? "below" : "above";
    cautions.push(valueCensoredCaution(censored, value, partition.unit));
  }
  if (input.unitConverted) cautions.push(unitConvertedCaution(input.unitConverted.from, partition.unit));
  if (input.reviewOverdue) cautions.push(REVIEW_OVERDUE_CAUTION);
  if (input.partitionChosenBy) cautions.push(partitionCaution(input.partitionChosenBy));

  return {
    z: s.z,
    percentile: s.percentile,
    percentileBound,
    flag,
    hl7: { obx7: obx7(partition.low, partition.high, partition.decimals), obx8: obx8(flag) },
    cautions,
  };
}
