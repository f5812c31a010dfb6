import { describe, expect, it } from "vitest";
import normal from "@stdlib/stats-base-dists-normal";
import { scoreEmpirical } from "@/lib/scoring/empirical";
import { StatsInputError } from "@/lib/stats/validate";
import fx from "../fixtures/scoring-checks.json";

const model = (values: number[]) => ({ kind: "empirical" as const, values });

describe("scoreEmpirical", () => {
  it("inverts R's type-6 quantile", () => {
    // R: quantile(x, p, type = 6) on 150 seeded values (scripts/fixtures/scoring-checks.R).
    // Scoring each quantile must give back 100·p; 1e-9 allows for the interpolation round trip.
    const m = model(fx.empirical.values);
    fx.empirical.p.forEach((p, i) => {
      const r = scoreEmpirical(m, fx.empirical.q[i]);
      expect(r.percentile).toBeCloseTo(100 * p, 9);
      expect(r.z).toBeCloseTo(normal.quantile(p, 0, 1), 8);
      expect(r.bound).toBeNull();
    });
  });

  it("interpolates linearly between (i/(n+1), x(i))", () => {
    // Hyndman & Fan definition 6, worked by hand: n = 4, x = 2.5 is rank 2.5 → 50%.
    expect(scoreEmpirical(model([1, 2, 3, 4]), 2.5)).toEqual({ z: 0, percentile: 50, bound: null });
    expect(scoreEmpirical(model([1, 2, 3, 4]), 1).percentile).toBeCloseTo(20, 12);
    expect(scoreEmpirical(model([1, 2, 3, 4]), 4).percentile).toBeCloseTo(80, 12);
    expect(scoreEmpirical(model([10, 20, 30, 40]), 32.5).percentile).toBeCloseTo(65, 12);
  });

  it("takes the mid-rank on ties, and interpolates from the tie's ends", () => {
    // Bellwether's rule (documented in empirical.ts): [1, 2, 2, 2, 3], x = 2 → ranks 2..4 → 3/6.
    const m = model([1, 2, 2, 2, 3]);
    expect(scoreEmpirical(m, 2).percentile).toBeCloseTo(50, 12);
    expect(scoreEmpirical(m, 1.5).percentile).toBeCloseTo((1.5 / 6) * 100, 12);
    expect(scoreEmpirical(m, 2.5).percentile).toBeCloseTo((4.5 / 6) * 100, 12);
    expect(scoreEmpirical(model([5, 5, 5, 6]), 5).percentile).toBeCloseTo(40, 12);
  });

  it("reports a bound outside the reference data", () => {
    const m = model([1, 2, 3, 4]);
    // Below 100/(n+1) = 20 and above 100·n/(n+1) = 80 (DESIGN.md "Scoring a patient value").
    const low = scoreEmpirical(m, 0.5);
    expect(low).toMatchObject({ percentile: 20, bound: "below" });
    expect(low.z).toBeCloseTo(normal.quantile(0.2, 0, 1), 12);
    expect(scoreEmpirical(m, 99)).toMatchObject({ percentile: 80, bound: "above" });
  });

  it("rejects a non-finite value", () => {
    expect(() => scoreEmpirical(model([1, 2]), Infinity)).toThrow(StatsInputError);
  });
});
