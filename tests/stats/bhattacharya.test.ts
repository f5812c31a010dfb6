import normal from "@stdlib/stats-base-dists-normal";
import { describe, expect, it } from "vitest";
import { bhattacharya, bhattacharyaLine } from "@/lib/stats/bhattacharya";
import { indirectCells } from "@/lib/stats/indirect-cells";
import { StatsInputError } from "@/lib/stats/validate";

describe("bhattacharyaLine", () => {
  it("meets METHODS.md §8.3's check: μ = 100, σ = 10, h = 2 gives slope −0.02 crossing zero at 100", () => {
    // Frequencies of a Gaussian component at the bin midpoints 80, 82, …, 120 (h = 2): then
    // Δ = ln f_{k+1} − ln f_k = −(h/σ²)(b − μ) exactly (METHODS.md §8.3, [COMPUTED: derivation]).
    const h = 2;
    const centres = Array.from({ length: 21 }, (_, k) => 80 + h * k);
    const freq = centres.map((x) => 1000 * Math.exp(-((x - 100) ** 2) / (2 * 10 ** 2)));
    const line = bhattacharyaLine(centres, freq.map((f) => f / h), freq);
    // The line is fitted to Δ/h; per bin of width h its slope is −h/σ² = −0.02.
    expect(line.slope * h).toBeCloseTo(-0.02, 12);
    expect(-line.intercept / line.slope).toBeCloseTo(100, 9);
    expect(line.mu).toBeCloseTo(100, 9);
    expect(line.sigma).toBeCloseTo(10, 9);
    expect(line.points).toBe(20);
  });

  it("uses only the pairs selected, and gives the same line on any straight stretch", () => {
    const centres = Array.from({ length: 41 }, (_, k) => 60 + 2 * k);
    const freq = centres.map((x) => 500 * Math.exp(-((x - 100) ** 2) / 200));
    const line = bhattacharyaLine(centres, freq, freq, (b) => b > 101 && b < 111);
    // Boundaries 61, 63, …: those in (101, 111) are 103, 105, 107 and 109.
    expect(line.points).toBe(4);
    expect(line.mu).toBeCloseTo(100, 9);
    expect(line.sigma).toBeCloseTo(10, 9);
  });

  it("refuses fewer than 3 pairs and a line that does not fall", () => {
    expect(() => bhattacharyaLine([1, 2, 3], [5, 5, 5], [5, 5, 5])).toThrow(/at least 3 pairs/);
    // ln f = x²: a rising line (a bowl, not a Gaussian's cap).
    const bowl = [1, 2, 3, 4].map((x) => Math.exp(x * x));
    expect(() => bhattacharyaLine([1, 2, 3, 4], bowl, bowl)).toThrow(StatsInputError);
    expect(() => bhattacharyaLine([1, 2, 3, 4], bowl, bowl)).toThrow(/does not fall/);
  });
});

describe("bhattacharya on routine results", () => {
  it("recovers a normal component from a mixture binned at its reporting resolution", () => {
    // 10,000 values of N(100, 10²) as normal quantiles (@stdlib's Φ⁻¹; no randomness), rounded
    // to whole units, plus 1,000 values from 150 to 170: the line through the central bins must
    // find σ ≈ 10 and the mean 100, which is 99 on the Box-Cox scale with λ = 1 (y = x − 1), so
    // the limits are about 100 ± 19.6 (common practice: μ ± 1.96σ).
    const values: number[] = [];
    for (let i = 1; i <= 10_000; i++) {
      const p = (i - 0.5) / 10_000;
      values.push(Math.round(100 + 10 * normal.quantile(p, 0, 1)));
    }
    for (let i = 0; i < 1000; i++) values.push(150 + (i % 21));
    const r = bhattacharya(indirectCells(values), 1);
    expect(r.method).toBe("bhattacharya");
    expect(r.mu).toBeCloseTo(99, 0);
    expect(r.sigma).toBeGreaterThan(9.5);
    expect(r.sigma).toBeLessThan(10.5);
    expect(r.lower as number).toBeGreaterThan(79.4);
    expect(r.upper as number).toBeLessThan(121.4);
  });
});

