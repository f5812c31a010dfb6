import { describe, expect, it } from "vitest";
import { screenOutliers } from "@/lib/stats/outlier-screen";

// The dispatch rules of METHODS.md §4 and DESIGN.md (Horn by default; Tukey fences on the raw
// scale when a value is not positive), written out here rather than read from the code.
describe("screenOutliers", () => {
  // METHODS.md §13 rows 3 and 4: Dixon D/R 0.4659 and Tukey fences [133.5, 201.5] flag 236.
  const published = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];

  it("runs Dixon/Reed and Tukey as asked, proposals in the order of the values", () => {
    expect(screenOutliers(published, "dixon").proposals.map((p) => p.value)).toEqual([236]);
    expect(screenOutliers(published, "dixon").proposals[0].evidence).toMatchObject({ ratio: expect.closeTo(0.4659, 4) });
    const tukey = screenOutliers(published, "tukey");
    expect(tukey.rule).toBe("tukey");
    expect(tukey.proposals[0].evidence).toMatchObject({ lowerFence: 133.5, upperFence: 201.5 });
  });

  it("runs Horn on positive values and hands back its sorted values and screen", () => {
    const result = screenOutliers(published, "horn");
    expect(result.rule).toBe("horn");
    expect(result.horn?.sorted).toEqual(Float64Array.from(published).sort());
    expect(result.warnings).toEqual([]);
  });

  it("falls back to Tukey on the raw scale when a value is not positive, with a warning", () => {
    const result = screenOutliers([0, ...published], "horn");
    expect(result.rule).toBe("tukey");
    expect(result.horn).toBeNull();
    expect(result.warnings).toEqual(["Horn's method needs positive values; Tukey fences on the raw scale were used instead."]);
  });

  it("runs nothing on no values, nor Horn or its fallback below 4 values", () => {
    expect(screenOutliers([], "dixon")).toEqual({ rule: null, proposals: [], horn: null, warnings: [] });
    expect(screenOutliers([1, 2, 3], "horn").rule).toBeNull();
    expect(screenOutliers([-1, 2, 3], "horn").rule).toBeNull();
  });
});
