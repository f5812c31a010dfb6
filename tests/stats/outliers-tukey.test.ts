import { describe, expect, it } from "vitest";
import { tukeyFencesOfSorted, tukeyOutliers } from "@/lib/stats/outliers-tukey";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

const WEIGHTS = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];

describe("tukeyOutliers", () => {
  it("fences the weights at [133.5, 201.5] and flags 236", () => {
    // computed with R (METHODS.md §4.2): type-7 quartiles 159 and 176, IQR 17
    const r = tukeyOutliers(WEIGHTS);
    expect(r.q1).toBeCloseTo(159, 12);
    expect(r.q3).toBeCloseTo(176, 12);
    expect(r.lowerFence).toBeCloseTo(133.5, 12);
    expect(r.upperFence).toBeCloseTo(201.5, 12);
    expect(r.outliers.map((o) => [o.index, o.value, o.method])).toEqual([[10, 236, "tukey"]]);
    // The value and the fences it lies beyond (METHODS.md §4.2: 133.5 and 201.5).
    expect(r.outliers[0].evidence).toEqual({
      rule: "tukey",
      side: "high",
      value: 236,
      q1: 159,
      q3: 176,
      k: 1.5,
      lowerFence: 133.5,
      upperFence: 201.5,
    });
  });

  it("uses R's type-7 quartiles (scripts/fixtures/reference-limits.R)", () => {
    // R: quantile(x, c(.25,.75), type = 7); 1e-9 absolute for interpolation rounding
    for (const s of fixture.sets) {
      const f = tukeyFencesOfSorted(Float64Array.from(s.values).sort());
      expect(f.q1, s.name).toBeCloseTo(s.quartiles7[0], 9);
      expect(f.q3, s.name).toBeCloseTo(s.quartiles7[1], 9);
    }
  });

  it("k = 3 gives the far-out fences (Tukey 1977)", () => {
    // 159 - 3·17 = 108, 176 + 3·17 = 227 → 236 is still far out
    const r = tukeyOutliers(WEIGHTS, 3);
    expect(r.upperFence).toBeCloseTo(227, 12);
    expect(r.outliers.map((o) => o.value)).toEqual([236]);
  });

  it("rejects bad input", () => {
    expect(() => tukeyOutliers([])).toThrow(StatsInputError);
    expect(() => tukeyOutliers([1, 2], 0)).toThrow(/positive/);
  });
});
