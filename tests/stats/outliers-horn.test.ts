import { describe, expect, it } from "vitest";
import { hornOutliers } from "@/lib/stats/outliers-horn";
import { boxCoxLambda, boxCoxTransform } from "@/lib/stats/box-cox";
import { tukeyOutliers } from "@/lib/stats/outliers-tukey";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

// R: rlnorm(80, log(30), 0.45) (scripts/fixtures/reference-limits.R) plus one gross value.
const LOGNORMAL = fixture.sets.find((s) => s.name === "lognormal-80")!.values;
const WITH_GROSS = [...LOGNORMAL, 900];

describe("hornOutliers", () => {
  it("equals Tukey's fences on the Box-Cox scale in its first round", () => {
    // Definition (METHODS.md §4.3): λ by ML, then type-7 Tukey fences of the transformed data.
    const x = WITH_GROSS;
    const l = boxCoxLambda(x);
    const tukey = tukeyOutliers(boxCoxTransform(x, l));
    const horn = hornOutliers(x, { maxIterations: 1 });
    const byIndex = (a: number, b: number) => a - b;
    expect(horn.outliers.map((o) => o.index).sort(byIndex)).toEqual(
      tukey.outliers.map((o) => o.index).sort(byIndex),
    );
    expect(horn.outliers.map((o) => o.value)).toContain(900);
    // 1e-6: both locate λ̂ to ~1e-8, summing in different orders (sorted vs input order)
    expect(horn.lowerFence).toBeCloseTo(tukey.lowerFence, 6);
    expect(horn.upperFence).toBeCloseTo(tukey.upperFence, 6);
  });

  it("keeps the long tail of skewed healthy data that raw Tukey fences would erode", () => {
    // The lognormal fixture (R: rlnorm(250, log(1.1), 0.3)) has no planted outliers. Raw Tukey
    // flags upper-tail values; on the Box-Cox scale far fewer are proposed (METHODS.md §4.4).
    const x = fixture.sets.find((s) => s.name === "lognormal-250")!.values;
    const raw = tukeyOutliers(x).outliers.length;
    const horn = hornOutliers(x);
    expect(horn.converged).toBe(true);
    expect(horn.outliers.length).toBeLessThan(raw);
  });

  it("iterates until nothing more is flagged, within the cap", () => {
    const x = [...fixture.sets.find((s) => s.name === "gaussian-120")!.values, 40, 0.2];
    const r = hornOutliers(x);
    expect(r.outliers.map((o) => o.value)).toEqual(expect.arrayContaining([40, 0.2]));
    expect(r.converged).toBe(true);
    expect(r.iterations).toBeLessThanOrEqual(10);
    const capped = hornOutliers(x, { maxIterations: 1 });
    expect(capped.iterations).toBe(1);
  });

  it("proposes without touching the data, with a reason", () => {
    const x = WITH_GROSS;
    const copy = [...x];
    const r = hornOutliers(x);
    expect(x).toEqual(copy);
    expect(r.outliers.find((o) => o.value === 900)).toMatchObject({ index: 80, method: "horn" });
    expect(r.outliers.find((o) => o.value === 900)!.reason).toMatch(/above the upper fence/);
  });

  it("needs positive values", () => {
    expect(() => hornOutliers([1, 2, 3, 0, 5])).toThrow(/not positive/);
    expect(() => hornOutliers([1, 2, 3])).toThrow(/at least 4/);
    expect(() => hornOutliers([])).toThrow(StatsInputError);
  });
});
