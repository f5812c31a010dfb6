import { describe, expect, it } from "vitest";
import binomial from "@stdlib/stats-base-dists-binomial";
import { verifyInterval } from "@/lib/stats/verification";
import { StatsInputError } from "@/lib/stats/validate";

const interval = { low: 3.5, high: 5.1 };
/** 20 values, `below` of them under 3.5 and `above` over 5.1, the rest inside (limits included). */
function sample(below: number, above: number, n = 20): number[] {
  const x = Array.from({ length: n }, (_, i) => 3.5 + (1.6 * i) / (n - 1));
  for (let i = 0; i < below; i++) x[i] = 3.0 - i / 10;
  for (let i = 0; i < above; i++) x[n - 1 - i] = 5.5 + i / 10;
  return x;
}

describe("verifyInterval (CLSI EP28-A3c 20-sample rule)", () => {
  it("accepts 2 of 20 outside, with the binomial probabilities of that outcome", () => {
    const r = verifyInterval(sample(1, 1), interval);
    expect(r).toMatchObject({ n: 20, below: 1, above: 1, outside: 2, allowedOutside: 2, verdict: "verified" });
    // R (scripts/fixtures/lahti-verification-checks.R): pbinom(2, 20, 0.05) = 0.92451632621150
    // (METHODS.md §7.1: 0.92452); dbinom(2, 20, 0.05) = 0.18867680126765;
    // 1 - pbinom(2, 20, 0.05) = 0.0754836737885. 1e-12: @stdlib and R both evaluate the exact sum.
    expect(r.probabilities.atMost).toBeCloseTo(0.9245163262115, 12);
    expect(r.probabilities.exactly).toBeCloseTo(0.18867680126765, 12);
    expect(r.probabilities.failIfIntervalRight).toBeCloseTo(0.0754836737885, 12);
    // P(X ≥ 2) = 1 − P(X ≤ 1) = 1 − 0.73584 (METHODS.md §7.1 table).
    expect(r.probabilities.atLeast).toBeCloseTo(1 - 0.35848592240854 - 0.37735360253531, 12);
    // Cross-check against @stdlib's binomial directly.
    expect(r.probabilities.atMost).toBe(binomial.cdf(2, 20, 0.05));
    expect(r.reasons).toEqual([
      "2 of 20 values (10.0%) fall outside 3.5–5.1 (1 below, 1 above); at most 2 are allowed, so the interval is verified",
    ]);
    expect(r.notes).toEqual([]);
  });

  it("counts values on a limit as inside", () => {
    const r = verifyInterval([3.5, 5.1, ...sample(0, 0).slice(2)], interval);
    expect(r.outside).toBe(0);
  });

  it("asks for a second set of 20 when 3 or more fall outside", () => {
    const r = verifyInterval(sample(2, 1), interval);
    expect(r.verdict).toBe("second-set-needed");
    // R: 1 - pbinom(2, 20, 0.05) = 0.0754836737885 = P(X ≥ 3); pbinom(3, 20, 0.05) = 0.98410 (METHODS.md).
    expect(r.probabilities.atLeast).toBeCloseTo(0.0754836737885, 12);
    expect(r.probabilities.exactly).toBeCloseTo(0.05958214776873, 12);
    expect(r.reasons[0]).toBe(
      "3 of 20 values (15.0%) fall outside 3.5–5.1 (2 below, 1 above); at most 2 are allowed, so a second set of 20 is needed",
    );
    expect(r.reasons[1]).toBe(
      "if the interval were right, 3 or more outside would happen with probability 0.0755",
    );
  });

  it("does not verify when the second set also fails", () => {
    const r = verifyInterval(sample(0, 5), interval, { secondSet: true });
    expect(r.verdict).toBe("not-verified");
    // R: 1 - pbinom(4, 20, 0.05) = 0.00257394033465 = P(X ≥ 5) (METHODS.md: 0.0026).
    expect(r.probabilities.atLeast).toBeCloseTo(0.00257394033465, 12);
    expect(r.reasons[0]).toMatch(/so the interval is not verified for this population$/);
    expect(r.reasons).toContain(
      "re-examine the method and the differences between the populations, and consider establishing a local interval",
    );
  });

  it("generalises to n ≠ 20 as at most 10% outside, and says so", () => {
    const thirty = verifyInterval(sample(2, 1, 30), interval);
    expect(thirty.allowedOutside).toBe(3);
    expect(thirty.verdict).toBe("verified");
    // R: pbinom(3, 30, 0.05) = 0.93922843869126
    expect(thirty.probabilities.atMost).toBeCloseTo(0.93922843869126, 12);
    expect(thirty.notes).toEqual([
      "EP28-A3c states its rule for 20 values (at most 2 outside); with 30 values it is applied as at most 10% outside (3)",
    ]);
    const ten = verifyInterval(sample(0, 1, 10), interval);
    expect(ten.allowedOutside).toBe(1);
    // R: pbinom(1, 10, 0.05) = 0.91386164410068
    expect(ten.probabilities.atMost).toBeCloseTo(0.91386164410068, 12);
    expect(ten.notes).toContain(
      "fewer than the 20 values EP28-A3c asks for: the check has little power to detect an unsuitable interval",
    );
    // 40 values, at most 4: R pbinom(4, 40, 0.05) = 0.95197173974578 (METHODS.md: 0.952).
    expect(verifyInterval(sample(0, 4, 40), interval).probabilities.atMost).toBeCloseTo(0.95197173974578, 12);
  });

  it("grades the first set with notVerifiedFrom: 3 or 4 outside call for a second set, 5 or more are not verified", () => {
    const four = verifyInterval(sample(2, 2), interval, { notVerifiedFrom: 5 });
    expect(four.verdict).toBe("second-set-needed");
    // R: 1 - pbinom(3, 20, 0.05) = 0.0159015260197636 (P(X ≥ 4); METHODS.md §7.1: 1 − 0.98410); 1 - pbinom(4, 20, 0.05) = 0.00257394033465
    // (METHODS.md §7.1: P(X ≥ 5) = 0.0026).
    expect(four.probabilities.atLeast).toBeCloseTo(0.0159015260197636, 12);
    expect(four.probabilities.rejectIfIntervalRight).toBeCloseTo(0.00257394033465, 12);
    const five = verifyInterval(sample(3, 2), interval, { notVerifiedFrom: 5 });
    expect(five.verdict).toBe("not-verified");
    expect(five.reasons[0]).toBe(
      "5 of 20 values (25.0%) fall outside 3.5–5.1 (3 below, 2 above); at most 2 are allowed, " +
        "and 5 or more outside in the first set means the interval is not verified for this population",
    );
    expect(five.reasons[1]).toBe("if the interval were right, 5 or more outside would happen with probability 0.00257");
    // A second set is never graded: 3 outside there is not verified.
    const second = verifyInterval(sample(2, 1), interval, { secondSet: true, notVerifiedFrom: 5 });
    expect(second.verdict).toBe("not-verified");
    expect(second.probabilities.rejectIfIntervalRight).toBeNull();
    expect(verifyInterval(sample(1, 1), interval).probabilities.rejectIfIntervalRight).toBeNull();
  });

  it("verifies a one-sided interval by the side it has", () => {
    // Upper limit only: values below 3.5 are not outside.
    const upper = verifyInterval(sample(4, 2), { low: null, high: 5.1 });
    expect(upper).toMatchObject({ below: 0, above: 2, outside: 2, verdict: "verified" });
    expect(upper.reasons[0]).toBe(
      "2 of 20 values (10.0%) fall above the upper limit 5.1; at most 2 are allowed, so the interval is verified",
    );
    const lower = verifyInterval(sample(3, 5), { low: 3.5, high: null }, { notVerifiedFrom: 5 });
    expect(lower).toMatchObject({ below: 3, above: 0, outside: 3, verdict: "second-set-needed" });
    expect(lower.reasons[0]).toBe(
      "3 of 20 values (15.0%) fall below the lower limit 3.5; at most 2 are allowed, so a second set of 20 is needed",
    );
    // R: 1 - pbinom(2, 20, 0.05) = 0.0754836737885 (a one-sided 95th percentile: p = 0.05 too).
    expect(lower.probabilities.atLeast).toBeCloseTo(0.0754836737885, 12);
  });

  it("rejects bad input", () => {
    expect(() => verifyInterval([1, 2], { low: null, high: null })).toThrow(
      "the interval needs a low limit, a high limit or both",
    );
    expect(() => verifyInterval(sample(0, 0), interval, { notVerifiedFrom: 3 })).toThrow(
      "notVerifiedFrom must be an integer above 3, so that some counts call for a second set (got 3)",
    );
    expect(() => verifyInterval([], interval)).toThrow("values is empty");
    expect(() => verifyInterval([1, NaN], interval)).toThrow(StatsInputError);
    expect(() => verifyInterval([1, 2], { low: 5, high: 4 })).toThrow(
      "the interval's low limit (5) must not exceed its high limit (4)",
    );
    expect(() => verifyInterval([1, 2], interval, { maxOutsideFraction: 1.5 })).toThrow(
      "maxOutsideFraction must be a number strictly between 0 and 1 (got 1.5)",
    );
  });
});
