import { describe, expect, it } from "vitest";
import { shapiroWilk } from "@/lib/stats/shapiro-wilk";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/sw-ad-normality.json";

// Shapiro & Wilk (Biometrika 1965) worked example: weights of 11 men, in lb.
const WEIGHTS = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];

describe("shapiroWilk", () => {
  it("reproduces R's shapiro.test on the 11 weights", () => {
    const { w, p } = shapiroWilk(WEIGHTS);
    // R 4.2.2: print(shapiro.test(x)$statistic, digits = 15) -> 0.78881469483538735,
    // p -> 0.00670381405650293 (METHODS.md §5.1). Same algorithm in double precision, so
    // agreement to ~1e-12 is expected; 1e-10 leaves room for Φ/Φ⁻¹ implementation differences.
    expect(w).toBeCloseTo(0.78881469483538735, 10);
    expect(p).toBeCloseTo(0.00670381405650293, 10);
    // Published: W ≈ 0.79, p < 0.01 (Shapiro & Wilk 1965, as quoted in METHODS.md §5.1).
    expect(w).toBeCloseTo(0.79, 2);
    expect(p).toBeLessThan(0.01);
  });

  it("reproduces R on the log-transformed weights", () => {
    const { w, p } = shapiroWilk(WEIGHTS.map(Math.log));
    // R: shapiro.test(log(x)) -> W = 0.8362087194796026, p = 0.0281656315515569
    // (METHODS.md §5.1 prints 0.83621 and 0.02817).
    expect(w).toBeCloseTo(0.8362087194796026, 10);
    expect(p).toBeCloseTo(0.0281656315515569, 10);
  });

  it("does not depend on the order of the input", () => {
    const shuffled = [236, 160, 148, 195, 161, 154, 182, 158, 170, 162, 166];
    expect(shapiroWilk(shuffled)).toEqual(shapiroWilk(WEIGHTS));
  });

  it("uses the exact p-value for n = 3", () => {
    // R: shapiro.test(c(1, 2, 3))$p.value = 0.999999999999993 (an equally spaced triple gives W = 1).
    expect(shapiroWilk([1, 2, 3]).p).toBeCloseTo(1, 10);
    expect(shapiroWilk([1, 2, 3]).w).toBeCloseTo(1, 12);
    // R: shapiro.test(c(1, 2, 4))$p.value = 0.636886845028963
    expect(shapiroWilk([1, 2, 4]).p).toBeCloseTo(0.636886845028963, 10);
  });

  it("handles tied values", () => {
    // R: shapiro.test(c(1,1,2,2,3,3,3,4,5,9,12,40))$p.value = 6.04175196907908e-05
    const { p } = shapiroWilk([1, 1, 2, 2, 3, 3, 3, 4, 5, 9, 12, 40]);
    expect(p / 6.04175196907908e-5).toBeCloseTo(1, 8);
  });

  // Fixtures: R's shapiro.test on seeded samples, n = 3 … 5000 and four shapes
  // (scripts/fixtures/sw-ad-normality.R). Same algorithm in double precision, differing only in
  // the Φ and Φ⁻¹ implementations (@stdlib vs R's nmath): W agrees to 1e-10 absolute, p to 1e-7
  // relative (p passes through ln(1 − W), which amplifies W's last-digit differences when W ≈ 1).
  for (const c of fixture.cases) {
    it(`matches R for a ${c.kind} sample of n = ${c.n}`, () => {
      const { w, p } = shapiroWilk(c.x);
      expect(Math.abs(w - c.w)).toBeLessThan(1e-10);
      expect(Math.abs(p - c.swP) / c.swP).toBeLessThan(1e-7);
    });
  }

  it("rejects fewer than 3 or more than 5000 values", () => {
    expect(() => shapiroWilk([1, 2])).toThrow(StatsInputError);
    expect(() => shapiroWilk([1, 2])).toThrow("values needs at least 3 values (got 2)");
    const big = Array.from({ length: 5001 }, (_, i) => Math.sin(i));
    expect(() => shapiroWilk(big)).toThrow(
      "Shapiro-Wilk (Royston) is defined for 3 to 5000 values (got 5001)",
    );
  });

  it("rejects non-finite values and a sample without spread", () => {
    expect(() => shapiroWilk([1, 2, Number.NaN, 4])).toThrow("values[2] is not a finite number (NaN)");
    expect(() => shapiroWilk([5, 5, 5, 5])).toThrow("all values are equal");
  });
});
