import { describe, expect, it } from "vitest";
import { adviseMethod, type LimitsWithCi } from "@/lib/stats/method-advice";
import { StatsInputError } from "@/lib/stats/validate";

// Limits 10–20 (width 10): a CI of width 2 is exactly 0.2 × width (DESIGN.md rule).
const narrow: LimitsWithCi = { lower: 10, upper: 20, lowerCi: [9.5, 10.5], upperCi: [19.5, 20.5] };
const wide: LimitsWithCi = { lower: 10, upper: 20, lowerCi: [9, 11], upperCi: [18, 22.5] };
const none: LimitsWithCi = { lower: null, upper: null, lowerCi: null, upperCi: null };

describe("adviseMethod (DESIGN.md method advice)", () => {
  it("recommends nonparametric from 120 values", () => {
    const a = adviseMethod({ n: 120, nonparametric: narrow, parametric: narrow, robust: null, normalityP: 0.5 });
    expect(a).toEqual({ recommended: "nonparametric", warnings: [] });
  });

  it("recommends parametric below 120 when normality holds, else robust", () => {
    const base = { n: 60, nonparametric: narrow, parametric: narrow, robust: narrow };
    expect(adviseMethod({ ...base, normalityP: 0.2 }).recommended).toBe("parametric");
    expect(adviseMethod({ ...base, normalityP: 0.01 }).recommended).toBe("robust");
    expect(adviseMethod({ ...base, normalityP: null }).recommended).toBe("robust");
    expect(adviseMethod({ ...base, normalityP: 0.2 }).warnings[0]).toMatch(/fewer than the 120/);
  });

  it("offers an adoption check below 20 values", () => {
    const a = adviseMethod({ n: 19, nonparametric: none, parametric: narrow, robust: null, normalityP: 0.5 });
    expect(a.recommended).toBeNull();
    expect(a.warnings.join(" ")).toMatch(/adoption check/);
  });

  it("warns when a CI is wider than 0.2 × the interval width, not when equal", () => {
    const a = adviseMethod({ n: 200, nonparametric: wide, parametric: null, robust: null, normalityP: null });
    // lower CI 2 = 0.2 × 10: no warning; upper CI 4.5 > 2: warning
    expect(a.warnings).toHaveLength(1);
    expect(a.warnings[0]).toMatch(/upper limit \(18 to 22.5\) is wider than 0.2/);
  });

  it("rejects a bad n", () => {
    expect(() => adviseMethod({ n: -1, nonparametric: none, parametric: null, robust: null, normalityP: null })).toThrow(StatsInputError);
  });
});

describe("adviseMethod with censored values", () => {
  // DESIGN.md/the estimate's rule: above 5% censored, only the nonparametric ranks use them.
  const limits = { lower: 1, upper: 2, lowerCi: [0.9, 1.1] as [number, number], upperCi: [1.9, 2.1] as [number, number] };
  const none = { lower: null, upper: null, lowerCi: null, upperCi: null };

  it("advises no method when more than 5% are censored and the nonparametric limits are not estimable", () => {
    const a = adviseMethod({ n: 30, nonparametric: none, parametric: limits, robust: limits, normalityP: 0.5, censoredFraction: 0.1 });
    expect(a).toEqual({
      recommended: null,
      warnings: [
        "10% of the values are censored (more than 5%): only the nonparametric method uses them, and it cannot " +
          "estimate the limits from 30 values (at least 39); no method is advised.",
      ],
    });
  });

  it("keeps the usual advice at exactly 5%", () => {
    const a = adviseMethod({ n: 60, nonparametric: limits, parametric: limits, robust: limits, normalityP: 0.5, censoredFraction: 0.05 });
    expect(a.recommended).toBe("parametric");
  });

  it("refuses a fraction outside [0, 1]", () => {
    expect(() => adviseMethod({ n: 60, nonparametric: limits, parametric: null, robust: null, normalityP: null, censoredFraction: 1.5 })).toThrow(
      new StatsInputError("censoredFraction must lie in [0, 1] (got 1.5)"),
    );
  });
});
