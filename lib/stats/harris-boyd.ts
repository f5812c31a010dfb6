import { mean, sampleSd } from "./descriptive";
import { assertFiniteNumber, assertFiniteSample, StatsInputError } from "./validate";

export interface SubgroupSummary {
  n: number;
  mean: number;
  /** Sample SD with the n − 1 denominator. */
  sd: number;
}

export interface HarrisBoydOptions {
  /** Multiplier k in z* = k·√((n₁ + n₂)/240); 3 as Harris & Boyd, some papers use 5. */
  multiplier?: number;
  /** Partition when larger SD / smaller SD exceeds this (default 1.5). */
  sdRatioLimit?: number;
}

export interface HarrisBoydResult {
  verdict: "partition" | "combine";
  z: number;
  zCritical: number;
  multiplier: number;
  /** Larger SD over smaller SD, ≥ 1. */
  sdRatio: number;
  sdRatioLimit: number;
  groups: [SubgroupSummary, SubgroupSummary];
  /** One sentence per criterion, with its numbers. */
  reasons: string[];
}

/**
 * Harris-Boyd critical value z* = k·√((n₁ + n₂)/240), equal to k when both subgroups have 120.
 * @see Harris EK, Boyd JC. On dividing reference data into subgroups to produce separate
 *   reference ranges. Clin Chem 1990;36:265–270.
 * @param n1 size of the first subgroup (≥ 2)
 * @param n2 size of the second subgroup (≥ 2)
 * @param multiplier k (default 3)
 * @throws StatsInputError for a size below 2 or a multiplier that is not positive
 * Complexity: O(1).
 * @example
 * harrisBoydCriticalZ(60, 60); // → 2.1213
 */
export function harrisBoydCriticalZ(n1: number, n2: number, multiplier = 3): number {
  for (const size of [n1, n2]) {
    if (!Number.isInteger(size) || size < 2) {
      throw new StatsInputError(`each subgroup needs at least 2 values (got ${size})`);
    }
  }
  if (typeof multiplier !== "number" || !Number.isFinite(multiplier) || multiplier <= 0) {
    throw new StatsInputError(`multiplier must be a positive number (got ${multiplier})`);
  }
  return multiplier * Math.sqrt((n1 + n2) / 240);
}

/**
 * Harris-Boyd test for partitioning reference data into two subgroups, from their summaries:
 * z = |x̄₁ − x̄₂|/√(s₁²/n₁ + s₂²/n₂) against z* = 3·√((n₁ + n₂)/240), and the ratio of the SDs
 * against 1.5. Partition when z > z* or the SD ratio > 1.5; otherwise combine.
 * The summaries must be on the scale the limits will be estimated on (transform first if the
 * data are skewed).
 *
 * @see Harris EK, Boyd JC. On dividing reference data into subgroups to produce separate
 *   reference ranges. Clin Chem 1990;36:265–270.
 * @param a first subgroup {n, mean, sd}
 * @param b second subgroup {n, mean, sd}
 * @param options multiplier (default 3) and sdRatioLimit (default 1.5)
 * @returns the verdict, z, z*, the SD ratio and one reason per criterion
 * @throws StatsInputError for a size below 2, a non-finite mean, a negative SD, both SDs 0,
 *   or a bad option
 * Complexity: O(1).
 * @example
 * harrisBoydFromSummaries({ n: 120, mean: 10, sd: 1 }, { n: 120, mean: 10.5, sd: 1 }).verdict;
 * // → "partition" (z = 3.87 > z* = 3)
 */
export function harrisBoydFromSummaries(
  a: SubgroupSummary,
  b: SubgroupSummary,
  options: HarrisBoydOptions = {},
): HarrisBoydResult {
  const multiplier = options.multiplier ?? 3;
  const sdRatioLimit = options.sdRatioLimit ?? 1.5;
  const zCritical = harrisBoydCriticalZ(a.n, b.n, multiplier);
  if (typeof sdRatioLimit !== "number" || !(sdRatioLimit >= 1) || !Number.isFinite(sdRatioLimit)) {
    throw new StatsInputError(`sdRatioLimit must be a number of at least 1 (got ${sdRatioLimit})`);
  }
  for (const [group, name] of [
    [a, "first"],
    [b, "second"],
  ] as const) {
    assertFiniteNumber(group.mean, `${name} subgroup mean`);
    if (typeof group.sd !== "number" || !Number.isFinite(group.sd) || group.sd < 0) {
      throw new StatsInputError(`${name} subgroup SD must be a non-negative number (got ${group.sd})`);
    }
  }
  if (a.sd === 0 && b.sd === 0) {
    throw new StatsInputError("both subgroups have SD 0: Harris-Boyd needs spread in the values");
  }

  const z = Math.abs(a.mean - b.mean) / Math.sqrt((a.sd * a.sd) / a.n + (b.sd * b.sd) / b.n);
  const sdRatio = Math.max(a.sd, b.sd) / Math.min(a.sd, b.sd);
  const meansDiffer = z > zCritical;
  const spreadsDiffer = sdRatio > sdRatioLimit;
  const reasons = [
    meansDiffer
      ? `z = ${z.toFixed(2)} exceeds z* = ${zCritical.toFixed(2)}: the subgroup means differ`
      : `z = ${z.toFixed(2)} does not exceed z* = ${zCritical.toFixed(2)}`,
    spreadsDiffer
      ? `SD ratio ${fmtRatio(sdRatio)} exceeds ${sdRatioLimit}: the subgroup spreads differ`
      : `SD ratio ${fmtRatio(sdRatio)} does not exceed ${sdRatioLimit}`,
  ];
  return {
    verdict: meansDiffer || spreadsDiffer ? "partition" : "combine",
    z,
    zCritical,
    multiplier,
    sdRatio,
    sdRatioLimit,
    groups: [{ ...a }, { ...b }],
    reasons,
  };
}

function fmtRatio(r: number): string {
  return Number.isFinite(r) ? r.toFixed(2) : "unbounded (one SD is 0)";
}

/**
 * Harris-Boyd test for partitioning, from the two subgroups' values (mean and n − 1 SD are
 * computed here); see {@link harrisBoydFromSummaries} for the rule.
 *
 * @see Harris EK, Boyd JC. On dividing reference data into subgroups to produce separate
 *   reference ranges. Clin Chem 1990;36:265–270.
 * @param a values of the first subgroup (≥ 2, finite), on the scale used for the limits
 * @param b values of the second subgroup (≥ 2, finite)
 * @param options multiplier (default 3) and sdRatioLimit (default 1.5)
 * @returns the verdict, z, z*, the SD ratio and one reason per criterion
 * @throws StatsInputError for fewer than 2 values in a subgroup, a non-finite value, or no
 *   spread in either subgroup
 * Complexity: O(n₁ + n₂).
 * @example
 * harrisBoyd(maleValues, femaleValues).verdict; // → "partition" or "combine"
 */
export function harrisBoyd(
  a: readonly number[],
  b: readonly number[],
  options: HarrisBoydOptions = {},
): HarrisBoydResult {
  assertFiniteSample(a, "first subgroup", 2);
  assertFiniteSample(b, "second subgroup", 2);
  return harrisBoydFromSummaries(
    { n: a.length, mean: mean(a), sd: sampleSd(a) },
    { n: b.length, mean: mean(b), sd: sampleSd(b) },
    options,
  );
}
