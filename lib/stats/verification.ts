import binomial from "@stdlib/stats-base-dists-binomial";
import { assertFiniteNumber, assertFiniteSample, assertOpenProbability, StatsInputError } from "./validate";

export interface VerificationOptions {
  /** Largest fraction of values allowed outside (default 0.1: 2 of 20). */
  maxOutsideFraction?: number;
  /** Fraction of healthy values outside a correct central 95% interval (default 0.05). */
  expectedOutsideFraction?: number;
  /** True when these values are the second set, after a first set failed. */
  secondSet?: boolean;
  /**
   * The graded first-set rule: with this many outside or more, the interval is not verified at
   * once instead of calling for a second set (e.g. 5 of 20). Unset: every failed first set
   * calls for a second set. Ignored for a second set.
   */
  notVerifiedFrom?: number;
}

export interface VerificationResult {
  verdict: "verified" | "second-set-needed" | "not-verified";
  n: number;
  below: number;
  above: number;
  outside: number;
  allowedOutside: number;
  /** Under X ~ Binomial(n, expectedOutsideFraction), i.e. if the interval were right. */
  probabilities: {
    exactly: number;
    atMost: number;
    atLeast: number;
    /** P(X > allowedOutside): how often a right interval fails this check. */
    failIfIntervalRight: number;
    /** P(X ≥ notVerifiedFrom), when that option is set: how often a right interval is rejected at once. */
    rejectIfIntervalRight: number | null;
  };
  reasons: string[];
  /** Remarks on how the rule was applied (sample size). */
  notes: string[];
}

const fmt = (v: number) => String(v);

/** Where the values counted fall, in words: "outside 3.5–5.1 (1 below, 2 above)", "above the upper limit 5.1". */
function describeOutside(low: number | null, high: number | null, below: number, above: number): string {
  if (low !== null && high !== null) return `outside ${fmt(low)}–${fmt(high)} (${below} below, ${above} above)`;
  return low !== null ? `below the lower limit ${fmt(low)}` : `above the upper limit ${fmt(high as number)}`;
}

/**
 * Verification of a transferred reference interval by the CLSI EP28-A3c 20-sample rule: count
 * the local healthy reference values outside the interval (limits inclusive) and accept it when
 * at most 2 of 20 fall outside; with 3 or more, test a second set of 20; if that also fails,
 * the interval is not verified for this population.
 *
 * For n ≠ 20 the rule is applied as at most ⌊0.1·n⌋ outside, and a note says so; fewer than 20
 * values add a note on low power. The binomial probabilities of the outcome, if the interval
 * were right (each value outside with probability 0.05), come from @stdlib.
 *
 * A one-sided interval (low or high null) counts only the values beyond the limit it has; the
 * expected fraction outside is then that of the one-sided limit (0.05 for a 95th percentile).
 * With `notVerifiedFrom` the first set is graded (a local policy option that secondary texts
 * describe, not EP28-A3c's own wording): fewer than that many outside but more than allowed
 * calls for a second set, that many or more is not verified at once.
 *
 * @see CLSI EP28-A3c. Defining, Establishing, and Verifying Reference Intervals in the Clinical
 *   Laboratory, 3rd ed. Clinical and Laboratory Standards Institute, 2010.
 * @param x the local reference values (at least 1, finite)
 * @param interval the interval being verified, {low, high}, low ≤ high; either may be null
 *   (one-sided), not both
 * @param options maxOutsideFraction, expectedOutsideFraction, secondSet, notVerifiedFrom
 * @returns the verdict, counts, binomial probabilities, reasons and notes
 * @throws StatsInputError for an empty sample, a non-finite value or limit, no limit at all,
 *   low > high, a fraction outside (0, 1), or a notVerifiedFrom that is not an integer above
 *   the allowed count
 * Complexity: O(n) time, O(1) memory.
 * @example
 * verifyInterval(twentyPotassiumValues, { low: 3.5, high: 5.1 }).verdict; // → "verified"
 */
export function verifyInterval(
  x: readonly number[],
  interval: { low: number | null; high: number | null },
  options: VerificationOptions = {},
): VerificationResult {
  assertFiniteSample(x, "values");
  if (interval.low === null && interval.high === null) {
    throw new StatsInputError("the interval needs a low limit, a high limit or both");
  }
  if (interval.low !== null) assertFiniteNumber(interval.low, "low limit");
  if (interval.high !== null) assertFiniteNumber(interval.high, "high limit");
  if (interval.low !== null && interval.high !== null && interval.low > interval.high) {
    throw new StatsInputError(
      `the interval's low limit (${interval.low}) must not exceed its high limit (${interval.high})`,
    );
  }
  const maxFraction = options.maxOutsideFraction ?? 0.1;
  const expected = options.expectedOutsideFraction ?? 0.05;
  assertOpenProbability(maxFraction, "maxOutsideFraction");
  assertOpenProbability(expected, "expectedOutsideFraction");

  const n = x.length;
  let below = 0;
  let above = 0;
  const low = interval.low ?? -Infinity;
  const high = interval.high ?? Infinity;
  for (const v of x) {
    if (v < low) below++;
    else if (v > high) above++;
  }
  const outside = below + above;
  // The small epsilon keeps ⌊0.1·30⌋ = 3 despite 0.1·30 = 3.0000000000000004 in binary.
  const allowedOutside = Math.floor(n * maxFraction + 1e-9);
  const rejectFrom = options.secondSet ? undefined : options.notVerifiedFrom;
  if (rejectFrom !== undefined && !(Number.isInteger(rejectFrom) && rejectFrom > allowedOutside + 1)) {
    throw new StatsInputError(
      `notVerifiedFrom must be an integer above ${allowedOutside + 1}, so that some counts call for a second set (got ${rejectFrom})`,
    );
  }
  const passed = outside <= allowedOutside;
  const rejectedAtOnce = rejectFrom !== undefined && outside >= rejectFrom;
  const verdict = passed ? "verified" : options.secondSet || rejectedAtOnce ? "not-verified" : "second-set-needed";

  const atMost = binomial.cdf(outside, n, expected);
  const atLeast = outside === 0 ? 1 : 1 - binomial.cdf(outside - 1, n, expected);
  const probabilities = {
    exactly: binomial.pmf(outside, n, expected),
    atMost,
    atLeast,
    failIfIntervalRight: 1 - binomial.cdf(allowedOutside, n, expected),
    rejectIfIntervalRight: rejectFrom === undefined ? null : 1 - binomial.cdf(rejectFrom - 1, n, expected),
  };

  const where = describeOutside(interval.low, interval.high, below, above);
  const outcome =
    verdict === "verified"
      ? "so the interval is verified"
      : verdict === "second-set-needed"
        ? `so a second set of ${n} is needed`
        : rejectedAtOnce
          ? `and ${rejectFrom} or more outside in the first set means the interval is not verified for this population`
          : "so the interval is not verified for this population";
  const reasons = [
    `${outside} of ${n} values (${((100 * outside) / n).toFixed(1)}%) fall ${where}; ` +
      `at most ${allowedOutside} are allowed, ${outcome}`,
  ];
  if (!passed) {
    reasons.push(
      `if the interval were right, ${outside} or more outside would happen with probability ${atLeast.toPrecision(3)}`,
    );
  }
  if (verdict === "not-verified") {
    reasons.push(
      "re-examine the method and the differences between the populations, and consider establishing a local interval",
    );
  }

  const notes: string[] = [];
  if (n !== 20 || maxFraction !== 0.1) {
    notes.push(
      `EP28-A3c states its rule for 20 values (at most 2 outside); with ${n} values it is ` +
        `applied as at most ${+(100 * maxFraction).toFixed(4)}% outside (${allowedOutside})`,
    );
  }
  if (n < 20) {
    notes.push("fewer than the 20 values EP28-A3c asks for: the check has little power to detect an unsuitable interval");
  }
  return { verdict, n, below, above, outside, allowedOutside, probabilities, reasons, notes };
}
