import { describe as group, expect, it } from "vitest";
import {
  describe,
  kurtosis,
  max,
  mean,
  median,
  medianSorted,
  min,
  n,
  sampleSd,
  sampleVariance,
  skewness,
  sortedCopy,
} from "@/lib/stats/descriptive";
import { StatsInputError } from "@/lib/stats/validate";

// The weights of 11 men from Shapiro & Wilk (Biometrika 1965), METHODS.md §5.1.
const WEIGHTS = [148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236];

// Tolerance 1e-12 relative: both sides are double-precision evaluations of the same sums.
const REL = 1e-12;

group("descriptive statistics", () => {
  it("matches R on the Shapiro-Wilk weights", () => {
    expect(n(WEIGHTS)).toBe(11);
    expect(mean(WEIGHTS)).toBeCloseTo(172, 12); // R: mean(x) = 172
    // R: sd(x) = 24.9519538313135
    expect(Math.abs(sampleSd(WEIGHTS) / 24.9519538313135 - 1)).toBeLessThan(REL);
    expect(median(WEIGHTS)).toBe(162); // R: median(x) = 162
    // R: m <- mean(x); m2 <- mean((x-m)^2); mean((x-m)^3)/m2^1.5 = 1.67854390158616
    expect(Math.abs(skewness(WEIGHTS) / 1.67854390158616 - 1)).toBeLessThan(REL);
    // R: mean((x-m)^4)/m2^2 - 3 = 1.99129774943557
    expect(Math.abs(kurtosis(WEIGHTS) / 1.99129774943557 - 1)).toBeLessThan(REL);
    expect(min(WEIGHTS)).toBe(148);
    expect(max(WEIGHTS)).toBe(236);
  });

  it("keeps precision far from zero (two-pass algorithm)", () => {
    // R: y <- 1e9 + c(4,7,13,16); var(y) = 30. A one-pass sum of squares loses every digit here.
    const y = [1e9 + 4, 1e9 + 7, 1e9 + 13, 1e9 + 16];
    expect(sampleVariance(y)).toBeCloseTo(30, 6);
    expect(mean(y)).toBe(1e9 + 10);
  });

  it("median of an even count averages the middle pair (common practice)", () => {
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(medianSorted([1, 2, 3, 4])).toBe(2.5);
  });

  it("sortedCopy sorts numerically and leaves the input alone", () => {
    const x = [10, 9, 100, 1];
    expect(sortedCopy(x)).toEqual([1, 9, 10, 100]);
    expect(x).toEqual([10, 9, 100, 1]);
  });

  it("describe gathers the same numbers and nulls what needs more values", () => {
    const s = describe(WEIGHTS);
    expect(s.n).toBe(11);
    expect(s.sd).toBeCloseTo(24.9519538313135, 10);
    expect(s.skewness).toBeCloseTo(1.67854390158616, 10);
    expect(describe([5])).toMatchObject({ n: 1, sd: null, skewness: null, kurtosis: null, median: 5 });
  });

  it("rejects bad input with a clear message", () => {
    expect(() => mean([])).toThrow(StatsInputError);
    expect(() => mean([])).toThrow(/empty/);
    expect(() => mean([1, Number.NaN])).toThrow(/values\[1\] is not a finite number/);
    expect(() => sampleSd([1])).toThrow(/at least 2/);
    expect(() => skewness([2, 2, 2])).toThrow(/all values are equal/);
    expect(() => max([1, Infinity])).toThrow(StatsInputError);
  });
});
