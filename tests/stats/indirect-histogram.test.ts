import normal from "@stdlib/stats-base-dists-normal";
import { describe, expect, it } from "vitest";
import { indirectCells } from "@/lib/stats/indirect-cells";
import { indirectHistogram } from "@/lib/stats/indirect-histogram";

describe("indirectHistogram", () => {
  it("gives each cell its count and N·fraction·P of the fitted distribution", () => {
    const values = [...Array.from({ length: 40 }, (_, i) => 3 + (i % 20) / 10), { value: 2, side: "below" as const }];
    const cells = indirectCells(values);
    const fit = { lambda: 1, mu: 3, sigma: 0.6 };
    const bins = indirectHistogram(cells, fit, 0.8);
    expect(bins).toHaveLength(cells.counts.length);
    expect(bins[0]).toMatchObject({ lower: 0, upper: 2, count: 1, open: true });
    // λ = 1: y = x − 1, so P(0 ≤ X < 2) = Φ((1 − 3)/0.6) − Φ((−1 − 3)/0.6) (@stdlib's Φ).
    const p0 = normal.cdf(1, 3, 0.6) - normal.cdf(-1, 3, 0.6);
    expect(bins[0].expectedNonDiseased).toBeCloseTo(41 * 0.8 * p0, 10);
    expect(bins.reduce((a, b) => a + b.count, 0)).toBe(41);
    expect(bins[1].open).toBe(false);
  });
});
