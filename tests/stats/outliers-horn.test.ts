import { describe, expect, it } from "vitest";
import { hornOutliers } from "@/lib/stats/outliers-horn";
import { tukeyOutliers } from "@/lib/stats/outliers-tukey";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";
import horn from "../fixtures/horn-outliers.json";

// Expected values: scripts/fixtures/horn-outliers.R, which follows the published steps of
// METHODS.md §4.3 with R's own optimiser (optimize) and quantile (type 7), round by round.
// Tolerances: R locates λ̂ to 1e-12, Bellwether to about 1e-8 (measured: λ within 5e-8, the
// Box-Cox values, quartiles and fences within 9e-8 relative); 1e-6 on λ and 1e-5 relative on
// the rest leave room for a different but equally valid maximiser path.
const close = (actual: number, expected: number, label: string) =>
  expect(Math.abs(actual - expected), `${label}: ${actual} vs R ${expected}`).toBeLessThanOrEqual(
    1e-5 * Math.max(1, Math.abs(expected)),
  );

describe("hornOutliers against R", () => {
  for (const set of horn.sets) {
    it(`${set.name}: the same rounds, λ, fences and outliers`, () => {
      const r = hornOutliers(set.values);
      expect(r.converged).toBe(set.converged);
      expect(r.iterations).toBe(set.rounds.length);
      expect(r.outliers.map((o) => o.index)).toEqual(set.outlierIndex);
      const last = set.rounds[set.rounds.length - 1];
      expect(Math.abs(r.lambda - last.lambda)).toBeLessThan(1e-6);
      close(r.lowerFence, last.lowerFence, "final lower fence");
      close(r.upperFence, last.upperFence, "final upper fence");
      // Each outlier names the round that set it aside, with that round's numbers.
      for (const o of r.outliers) {
        const round = set.rounds.findIndex((rd) => rd.flaggedIndex.includes(o.index));
        const rd = set.rounds[round];
        const e = o.evidence;
        expect(e.rule).toBe("horn");
        if (e.rule !== "horn") continue;
        expect(e.round).toBe(round + 1);
        expect(Math.abs(e.lambda - rd.lambda)).toBeLessThan(1e-6);
        close(e.transformedValue, rd.flaggedTransformed[rd.flaggedIndex.indexOf(o.index)], `value ${o.value}`);
        close(e.q1, rd.q1, "Q1");
        close(e.q3, rd.q3, "Q3");
        close(e.lowerFence, rd.lowerFence, "lower fence");
        close(e.upperFence, rd.upperFence, "upper fence");
        expect(e.k).toBe(1.5);
        expect(e.side).toBe(e.transformedValue > e.upperFence ? "high" : "low");
      }
    });
  }

  it("stops after the round cap, saying it did not converge", () => {
    // R's first round of the gamma set flags three values; a cap of one round leaves it there.
    const set = horn.sets.find((s) => s.name === "gamma-60-clean")!;
    const first = set.rounds[0];
    expect(first.flaggedIndex.length).toBeGreaterThan(0);
    const r = hornOutliers(set.values, { maxIterations: 1 });
    expect(r.iterations).toBe(1);
    expect(r.converged).toBe(false);
    expect(r.outliers.map((o) => o.index)).toEqual(first.flaggedIndex);
    close(r.lowerFence, first.lowerFence, "round-1 lower fence");
    close(r.upperFence, first.upperFence, "round-1 upper fence");
  });
});

describe("hornOutliers", () => {
  it("keeps the long tail of skewed healthy data that raw Tukey fences would erode", () => {
    // The lognormal fixture (R: rlnorm(250, log(1.1), 0.3)) has no planted outliers. Raw Tukey
    // flags upper-tail values; on the Box-Cox scale far fewer are proposed (METHODS.md §4.4).
    const x = fixture.sets.find((s) => s.name === "lognormal-250")!.values;
    const raw = tukeyOutliers(x).outliers.length;
    const r = hornOutliers(x);
    expect(r.converged).toBe(true);
    expect(r.outliers.length).toBeLessThan(raw);
  });

  it("proposes without touching the data, with a reason", () => {
    const x = horn.sets.find((s) => s.name === "lognormal-80-gross")!.values;
    const copy = [...x];
    const r = hornOutliers(x);
    expect(x).toEqual(copy);
    expect(r.outliers.find((o) => o.value === 900)).toMatchObject({ index: 80, method: "horn" });
    expect(r.outliers.find((o) => o.value === 900)!.reason).toMatch(/above the upper fence .* \(round 1\)$/);
  });

  it("needs positive values", () => {
    expect(() => hornOutliers([1, 2, 3, 0, 5])).toThrow("values[3] = 0 is not positive; a log or Box-Cox transform needs values > 0");
    expect(() => hornOutliers([1, 2, 3])).toThrow("Horn's method needs at least 4 values (got 3)");
    expect(() => hornOutliers([])).toThrow(StatsInputError);
    expect(() => hornOutliers([])).toThrow("values is empty");
  });
});
