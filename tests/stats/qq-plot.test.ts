import { describe, expect, it } from "vitest";
import { normalQqPlot } from "@/lib/stats/qq-plot";
import { StatsInputError } from "@/lib/stats/validate";

describe("normalQqPlot", () => {
  it("pairs sorted values with Blom's normal scores", () => {
    const plot = normalQqPlot([5, 1, 4, 2, 3]);
    // R: qnorm((1:5 - 3/8) / (5 + 1/4)); 1e-12 allows for Φ⁻¹ implementation differences.
    const expected = [-1.17976111761186, -0.497200570681554, 0, 0.497200570681554, 1.17976111761186];
    expect(plot.points.map((p) => p.sample)).toEqual([1, 2, 3, 4, 5]);
    expect(plot.points.map((p) => p.rank)).toEqual([1, 2, 3, 4, 5]);
    plot.points.forEach((p, i) => expect(p.theoretical).toBeCloseTo(expected[i], 12));
    expect(plot.thinned).toBe(false);
    expect(plot.n).toBe(5);
  });

  it("gives the fitted-normal reference line through the mean with slope SD", () => {
    // Mean 3 and SD sqrt(2.5) of 1..5: common practice, worked by hand.
    const { line } = normalQqPlot([1, 2, 3, 4, 5]);
    expect(line.intercept).toBeCloseTo(3, 14);
    expect(line.slope).toBeCloseTo(Math.sqrt(2.5), 14);
  });

  it("thins a large sample to maxPoints, keeping both tails in full", () => {
    const x = Array.from({ length: 1000 }, (_, i) => Math.sin(i) * 10 + i / 100);
    const plot = normalQqPlot(x, { maxPoints: 100, tailPoints: 10 });
    expect(plot.thinned).toBe(true);
    expect(plot.points).toHaveLength(100);
    const ranks = plot.points.map((p) => p.rank);
    expect(ranks.slice(0, 10)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
    expect(ranks.slice(-10)).toEqual([991, 992, 993, 994, 995, 996, 997, 998, 999, 1000]);
    for (let i = 1; i < ranks.length; i++) expect(ranks[i]).toBeGreaterThan(ranks[i - 1]);
    // R: qnorm((c(1, 1000) - 3/8) / (1000 + 1/4)) = ∓3.22728994583667 (theoretical scores use the
    // full n, not the thinned count).
    expect(plot.points[0].theoretical).toBeCloseTo(-3.22728994583667, 10);
    expect(plot.points[99].theoretical).toBeCloseTo(3.22728994583667, 10);
    const sorted = [...x].sort((a, b) => a - b);
    for (const p of plot.points) expect(p.sample).toBe(sorted[p.rank - 1]);
  });

  it("defaults to at most 500 points", () => {
    const x = Array.from({ length: 5000 }, (_, i) => Math.cos(i));
    expect(normalQqPlot(x).points).toHaveLength(500);
    expect(normalQqPlot(x.slice(0, 500)).thinned).toBe(false);
  });

  it("rejects bad input and bad options", () => {
    expect(() => normalQqPlot([1])).toThrow("values needs at least 2 values (got 1)");
    expect(() => normalQqPlot([1, NaN])).toThrow(StatsInputError);
    expect(() => normalQqPlot([1, 2, 3], { maxPoints: 1 })).toThrow(
      "maxPoints must be an integer of at least 10 (got 1)",
    );
  });
});
