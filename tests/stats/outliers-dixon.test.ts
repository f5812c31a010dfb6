import { describe, expect, it } from "vitest";
import { dixonReedOutliers } from "@/lib/stats/outliers-dixon";
import { StatsInputError } from "@/lib/stats/validate";

const WEIGHTS = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];

describe("dixonReedOutliers", () => {
  it("flags 236 at D/R = 0.4659, then stops at 0.2766", () => {
    // computed with R (METHODS.md §4.1): (236-195)/(236-148) = 0.4659; (195-182)/(195-148) = 0.2766
    const r = dixonReedOutliers(WEIGHTS);
    expect(r.outliers.map((o) => [o.index, o.value, o.method])).toEqual([[10, 236, "dixon"]]);
    expect(r.steps[0]).toMatchObject({ side: "high", kind: "single", flagged: true });
    expect(r.steps[0].ratio).toBeCloseTo(41 / 88, 12);
    expect(r.steps[1]).toMatchObject({ side: "high", kind: "single", flagged: false });
    expect(r.steps[1].ratio).toBeCloseTo(13 / 47, 12);
    expect(r.outliers[0].reason).toContain("0.4659");
    // The statistic itself: D = 236 − 195, R = 236 − 148 (METHODS.md §4.1), against 1/3.
    expect(r.outliers[0].evidence).toEqual({
      rule: "dixon",
      side: "high",
      kind: "single",
      gap: 41,
      range: 88,
      ratio: 41 / 88,
      threshold: 1 / 3,
      step: 1,
    });
  });

  it("never alters the caller's array and reports original indices", () => {
    const x = [236, 160, 148, 195, 154, 158, 161, 162, 166, 170, 182];
    const copy = [...x];
    const r = dixonReedOutliers(x);
    expect(x).toEqual(copy);
    expect(r.outliers[0]).toMatchObject({ index: 0, value: 236 });
  });

  it("finds a masked pair with the block test, and a low outlier", () => {
    // Hand computation: 100 and 101 mask each other as singles (gap 1, range 100: 0.01); as a
    // block the gap is 100 - 10 = 90 over the range 100, 0.9 ≥ 1/3 (METHODS.md §4.1 block rule).
    const pair = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 100, 101];
    const r = dixonReedOutliers(pair);
    expect(r.outliers.map((o) => o.value).sort((a, b) => a - b)).toEqual([100, 101]);
    expect(r.steps.find((s) => s.kind === "block")).toMatchObject({ side: "high", flagged: true });
    // Both values of the block carry its statistic: gap 100 − 10 = 90 over the range 101 − 1 = 100.
    for (const o of r.outliers) {
      expect(o.evidence).toMatchObject({ rule: "dixon", side: "high", kind: "block", gap: 90, range: 100, ratio: 0.9 });
    }
    // low side: (20 - 1)/(25 - 1) = 0.79 ≥ 1/3
    const low = dixonReedOutliers([1, 20, 21, 22, 23, 24, 25]);
    expect(low.outliers.map((o) => o.value)).toEqual([1]);
  });

  it("flags nothing in evenly spread data", () => {
    expect(dixonReedOutliers([1, 2, 3, 4, 5, 6]).outliers).toEqual([]);
    expect(dixonReedOutliers([5, 5, 5]).outliers).toEqual([]);
    expect(dixonReedOutliers([5]).outliers).toEqual([]);
  });

  it("rejects bad input", () => {
    expect(() => dixonReedOutliers([])).toThrow(StatsInputError);
    expect(() => dixonReedOutliers([1, Number.NaN, 3])).toThrow(/finite/);
  });
});
