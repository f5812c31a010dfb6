import { describe, expect, it } from "vitest";
import { nonparametricLimits } from "@/lib/stats/nonparametric";
import { sortedCopy } from "@/lib/stats/descriptive";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

const ONE_TO_120 = Array.from({ length: 120 }, (_, i) => i + 1);

describe("nonparametricLimits", () => {
  it("gives 3.025 and 117.975 for 1..120 with rank CIs", () => {
    // computed with R (METHODS.md §1.1, §1.2): quantile(1:120, c(.025,.975), type=6); ranks 1-7, 114-120
    const r = nonparametricLimits(ONE_TO_120);
    expect(r.lower).toBeCloseTo(3.025, 9);
    expect(r.upper).toBeCloseTo(117.975, 9);
    expect(r.lowerCi).toEqual([1, 7]);
    expect(r.upperCi).toEqual([114, 120]);
    expect(r.ciMethod).toBe("binomial-ranks");
  });

  it("matches R on the fixture sets", () => {
    // scripts/fixtures/reference-limits.R: quantile(x, c(.025,.975), type=6) and x(r) for the
    // binomial ranks; 1e-9 absolute covers the interpolation rounding.
    for (const s of fixture.sets) {
      const r = nonparametricLimits(sortedCopy(s.values));
      expect(r.lower, s.name).toBeCloseTo(s.quantile6[0], 9);
      expect(r.upper, s.name).toBeCloseTo(s.quantile6[1], 9);
      if (s.rankCi) {
        expect(r.lowerCi, s.name).toEqual(s.rankCi.lowerCi);
        expect(r.upperCi, s.name).toEqual(s.rankCi.upperCi);
        expect(r.ciMethod).toBe("binomial-ranks");
      } else {
        expect(r.ciMethod).toBe("bootstrap");
      }
    }
  });

  it("labels bootstrap CIs below 119 values and is reproducible for a seed", () => {
    const x = sortedCopy(fixture.sets.find((s) => s.name === "lognormal-80")!.values);
    const a = nonparametricLimits(x, { seed: 5 });
    expect(a.ciMethod).toBe("bootstrap");
    expect(a).toEqual(nonparametricLimits(x, { seed: 5 }));
    // A bootstrap percentile CI lies within the data and brackets its own point estimate here
    // (common practice; not a theorem for every sample).
    expect(a.lowerCi![0]).toBeGreaterThanOrEqual(x[0]);
    expect(a.lowerCi![0]).toBeLessThanOrEqual(a.lower!);
    expect(a.upperCi![1]).toBeGreaterThanOrEqual(a.upper!);
    expect(a.upperCi![1]).toBeLessThanOrEqual(x[x.length - 1]);
  });

  it("is not estimable below 39 values", () => {
    // computed with R (METHODS.md §1.1): 39 is the smallest n with 0.025(n+1) ≥ 1
    expect(nonparametricLimits(ONE_TO_120.slice(0, 38))).toEqual({
      lower: null, upper: null, lowerCi: null, upperCi: null, ciMethod: null,
    });
    expect(nonparametricLimits(ONE_TO_120.slice(0, 39)).lower).toBe(1);
  });

  it("rejects unsorted or bad input", () => {
    expect(() => nonparametricLimits([])).toThrow(StatsInputError);
    expect(() => nonparametricLimits([3, 2, 1])).toThrow(/sorted/);
    expect(() => nonparametricLimits([1, Number.NaN])).toThrow(/finite/);
  });
});
