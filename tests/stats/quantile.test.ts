import { describe, expect, it } from "vitest";
import { quantileType6, quantileType7, valueAtRank } from "@/lib/stats/quantile";
import { StatsInputError } from "@/lib/stats/validate";

const WEIGHTS = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];
const ONE_TO_120 = Array.from({ length: 120 }, (_, i) => i + 1);

// Interpolation of integers by fractions of the form k/100: exact to 1e-9.
const DIGITS = 9;

describe("quantileType6", () => {
  it("gives the limits of 1..120", () => {
    // computed with R (METHODS.md §1.1): quantile(1:120, c(.025,.975), type=6) = 3.025, 117.975
    expect(quantileType6(ONE_TO_120, 0.025)).toBeCloseTo(3.025, DIGITS);
    expect(quantileType6(ONE_TO_120, 0.975)).toBeCloseTo(117.975, DIGITS);
  });

  it("matches R on the weights", () => {
    // R: quantile(x, c(.1,.25,.5,.9), type=6) = 149.2 158 162 227.8
    expect(quantileType6(WEIGHTS, 0.1)).toBeCloseTo(149.2, DIGITS);
    expect(quantileType6(WEIGHTS, 0.25)).toBeCloseTo(158, DIGITS);
    expect(quantileType6(WEIGHTS, 0.5)).toBe(162);
    expect(quantileType6(WEIGHTS, 0.9)).toBeCloseTo(227.8, DIGITS);
  });

  it("returns null instead of clamping when the rank leaves 1..n", () => {
    // METHODS.md §1.1: n = 11, r = 0.3 < 1; R silently returns the minimum 148 here.
    expect(quantileType6(WEIGHTS, 0.025)).toBeNull();
    expect(quantileType6(WEIGHTS, 0.975)).toBeNull();
    // 39 is the smallest n with 0.025(n+1) ≥ 1 (METHODS.md §1.1, computed)
    const x38 = ONE_TO_120.slice(0, 38);
    const x39 = ONE_TO_120.slice(0, 39);
    expect(quantileType6(x38, 0.025)).toBeNull();
    expect(quantileType6(x39, 0.025)).toBe(1);
    expect(quantileType6(x39, 0.975)).toBe(39);
  });

  it("rejects bad input", () => {
    expect(() => quantileType6([], 0.5)).toThrow(StatsInputError);
    expect(() => quantileType6([1, 2], 0)).toThrow(/strictly between 0 and 1/);
    expect(() => quantileType6([1, 2], 1.5)).toThrow(/strictly between 0 and 1/);
    expect(() => quantileType6([1, 2], Number.NaN)).toThrow(StatsInputError);
    expect(() => quantileType6([2, 1], 0.5)).toThrow(/sorted ascending/);
    expect(() => quantileType6([1, Number.NaN], 0.5)).toThrow(/not a finite number/);
  });
});

describe("quantileType7", () => {
  it("gives R's default quartiles", () => {
    // computed with R (METHODS.md §4.2): quantile(x, c(.25,.75)) = 159, 176
    expect(quantileType7(WEIGHTS, 0.25)).toBeCloseTo(159, DIGITS);
    expect(quantileType7(WEIGHTS, 0.75)).toBeCloseTo(176, DIGITS);
    expect(quantileType7(WEIGHTS, 0)).toBe(148);
    expect(quantileType7(WEIGHTS, 1)).toBe(236);
  });
});

describe("valueAtRank", () => {
  it("interpolates and refuses ranks outside 1..n (common practice)", () => {
    expect(valueAtRank([10, 20, 30], 1.5)).toBe(15);
    expect(valueAtRank([10, 20, 30], 3)).toBe(30);
    expect(valueAtRank([10, 20, 30], 0.99)).toBeNull();
    expect(valueAtRank([10, 20, 30], 3.01)).toBeNull();
  });
});
