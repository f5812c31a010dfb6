import binomial from "@stdlib/stats-base-dists-binomial";
import { assertFiniteNumber, assertFiniteSample, assertOpenProbability, StatsInputError } from "./validate";

export interface VerificationOptions {
  /** Largest fraction of values allowed outside (default 0.1: 2 of 20). */
  maxOutsideFraction?: number;
  /** Fraction of healthy values outside a correct central 95% interval (default 0.05). */
  expectedOutsideFraction?: number;
  /** True when these values are the second set, after a first set failed. */
  secondSet?: boolean;
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
  };
  reasons: string[];
  /** Remarks on how the rule was applied (sample size). */
  notes: string[];
}

const fmt = (v: number) => String(v);

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
 * @see CLSI EP28-A3c. Defining, Establishing, and Verifying Reference Intervals in the Clinical
 *   Laboratory, 3rd ed. Clinical and Laboratory Standards Institute, 2010.
 * @param x the local reference values (at least 1, finite)
 * @param interval the interval being verified, {low, high}, low ≤ high
 * @param options maxOutsideFraction, expectedOutsideFraction, secondSet
 * @returns the verdict, counts, binomial probabilities, reasons and notes
 * @throws StatsInputError for an empty sample, a non-finite value or limit, low > high, or a
 *   fraction outside (0, 1)
 * Complexity: O(n) time, O(1) memory.
 * @example
 * verifyInterval(twentyPotassiumValues, { low: 3.5, high: 5.1 }).verdict; // → "verified"
 */
export function verifyInterval(
  x: readonly number[],
  interval: { low: number; high: number },
  options: VerificationOptions = {},
): VerificationResult {
  assertFiniteSample(x, "values");
  assertFiniteNumber(interval.low, "low limit");
  assertFiniteNumber(interval.high, "high limit");
  if (interval.low > interval.high) {
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
  for (const v of x) {
    if (v < interval.low) below++;
    else if (v > interval.high) above++;
  }
  const outside = below + above;
  // The small epsilon keeps ⌊0.1·30⌋ = 3 despite 0.1·30 = 3.0000000000000004 in binary.
  const allowedOutside = Math.floor(n * maxFraction + 1e-9);
  const passed = outside <= allowedOutside;
  const verdict = passed ? "verified" : options.secondSet ? "not-verified" : "second-set-needed";

  const atMost = binomial.cdf(outside, n, expected);
  const atLeast = outside === 0 ? 1 : 1 - binomial.cdf(outside - 1, n, expected);
  const probabilities = {
    exactly: binomial.pmf(outside, n, expected),
    atMost,
    atLeast,
    failIfIntervalRight: 1 - binomial.cdf(allowedOutside, n, expected),
  };

  const range = `${fmt(interval.low)}–${fmt(interval.high)}`;
  const outcome =
    verdict === "verified"
      ? "so the interval is verified"
      : verdict === "second-set-needed"
        ? `so a second set of ${n} is needed`
        : "so the interval is not verified for this population";
  const reasons = [
    `${outside} of ${n} values (${((100 * outside) / n).toFixed(1)}%) fall outside ${range} ` +
      `(${below} below, ${above} above); at most ${allowedOutside} are allowed, ${outcome}`,
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
