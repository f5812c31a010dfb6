import { describe, expect, it } from "vitest";
import { harrisBoyd, harrisBoydCriticalZ, harrisBoydFromSummaries } from "@/lib/stats/harris-boyd";
import { StatsInputError } from "@/lib/stats/validate";

describe("harrisBoydCriticalZ", () => {
  it("matches the z* table", () => {
    // Computed with R (METHODS.md §6.1): 3 * sqrt((n1 + n2) / 240) → 3, 2.121320344, 4.242640687,
    // 4.330127019. Closed form, so 1e-9.
    expect(harrisBoydCriticalZ(120, 120)).toBeCloseTo(3, 9);
    expect(harrisBoydCriticalZ(60, 60)).toBeCloseTo(2.121320344, 9);
    expect(harrisBoydCriticalZ(240, 240)).toBeCloseTo(4.242640687, 9);
    expect(harrisBoydCriticalZ(200, 300)).toBeCloseTo(4.330127019, 9);
    // The 5·sqrt variant some papers use (METHODS.md §6.1): configurable multiplier.
    expect(harrisBoydCriticalZ(120, 120, 5)).toBeCloseTo(5, 9);
  });

  it("rejects sizes below 2 and a non-positive multiplier", () => {
    expect(() => harrisBoydCriticalZ(1, 120)).toThrow("each subgroup needs at least 2 values (got 1)");
    expect(() => harrisBoydCriticalZ(120, 120, 0)).toThrow("multiplier must be a positive number (got 0)");
  });
});

describe("harrisBoyd", () => {
  const a = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];
  const b = [139, 141, 150, 152, 153, 155, 158, 160, 161, 170];

  it("computes z, z* and the SD ratio from two samples", () => {
    const r = harrisBoyd(a, b);
    // R (scripts/fixtures/lahti-verification-checks.R): abs(mean(a)-mean(b))/sqrt(var(a)/11+var(b)/10) = 2.241792886073; sd(a)/sd(b) = 2.692552371161;
    // 3*sqrt(21/240) = 0.887411967465. 1e-9: closed forms in double precision.
    expect(r.z).toBeCloseTo(2.241792886073, 9);
    expect(r.sdRatio).toBeCloseTo(2.692552371161, 9);
    expect(r.zCritical).toBeCloseTo(0.887411967465, 9);
    expect(r.verdict).toBe("partition");
    expect(r.reasons).toEqual([
      "z = 2.24 exceeds z* = 0.89: the subgroup means differ",
      "SD ratio 2.69 exceeds 1.5: the subgroup spreads differ",
    ]);
  });

  it("combines when means and spreads agree, and names both numbers", () => {
    // Worked by hand (Harris & Boyd 1990 rule as in METHODS.md §6.1): z = 0.2/sqrt(1/120+1.44/120)
    // = 1.403 ≤ 3, SD ratio 1.2 ≤ 1.5.
    const r = harrisBoydFromSummaries({ n: 120, mean: 10, sd: 1 }, { n: 120, mean: 10.2, sd: 1.2 });
    expect(r.z).toBeCloseTo(0.2 / Math.sqrt(1 / 120 + 1.44 / 120), 12);
    expect(r.verdict).toBe("combine");
    expect(r.reasons).toEqual(["z = 1.40 does not exceed z* = 3.00", "SD ratio 1.20 does not exceed 1.5"]);
  });

  it("partitions on the SD ratio alone", () => {
    const r = harrisBoydFromSummaries({ n: 120, mean: 10, sd: 1 }, { n: 120, mean: 10, sd: 1.6 });
    expect(r.z).toBe(0);
    expect(r.verdict).toBe("partition");
    expect(r.reasons[1]).toBe("SD ratio 1.60 exceeds 1.5: the subgroup spreads differ");
  });

  it("partitions on z alone, using the plus sign in the denominator", () => {
    // 0.5/sqrt(1/120 + 1/120) = 3.873 > 3 (worked by hand).
    const r = harrisBoydFromSummaries({ n: 120, mean: 10, sd: 1 }, { n: 120, mean: 10.5, sd: 1 });
    expect(r.z).toBeCloseTo(3.872983346207417, 12);
    expect(r.verdict).toBe("partition");
  });

  it("rejects bad input", () => {
    expect(() => harrisBoyd([1], [1, 2])).toThrow("first subgroup needs at least 2 values (got 1)");
    expect(() => harrisBoyd([1, 2], [1, NaN])).toThrow(StatsInputError);
    expect(() => harrisBoydFromSummaries({ n: 10, mean: 1, sd: 0 }, { n: 10, mean: 1, sd: 0 })).toThrow(
      "both subgroups have SD 0: Harris-Boyd needs spread in the values",
    );
    expect(() => harrisBoydFromSummaries({ n: 10, mean: 1, sd: -1 }, { n: 10, mean: 1, sd: 1 })).toThrow(
      "first subgroup SD must be a non-negative number (got -1)",
    );
  });
});
