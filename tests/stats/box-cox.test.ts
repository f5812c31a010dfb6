import { describe, expect, it } from "vitest";
import {
  boxCoxFit,
  boxCoxInverse,
  boxCoxLambda,
  boxCoxLogLik,
  boxCoxTransform,
} from "@/lib/stats/box-cox";
import { brentMaximize } from "@/lib/stats/brent";
import { StatsInputError } from "@/lib/stats/validate";

const ONE_TO_TEN = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
const SKEWED = [2.1, 2.9, 3.2, 3.8, 4.4, 5.0, 5.9, 7.3, 9.6, 14.2];

// λ̂ is located to ~1e-8; METHODS.md prints 5 decimals, R's optimize(tol=1e-12) gives more.
// Log-likelihoods are double-precision sums of 10 terms: 1e-9 absolute is ample.
describe("Box-Cox profile log-likelihood (with the Jacobian term)", () => {
  it("matches the check values of METHODS.md §2.2", () => {
    // computed with R (METHODS.md §2.2): ℓ(0) = -11.47184, ℓ(1) = -10.55107 for 1..10
    // more digits from R: ll(l,x) = -n/2*log(mean((y-mean(y))^2)) + (l-1)*sum(log(x))
    expect(boxCoxLogLik(ONE_TO_TEN, 0)).toBeCloseTo(-11.471839808098, 9);
    expect(boxCoxLogLik(ONE_TO_TEN, 1)).toBeCloseTo(-10.551066001733, 9);
    expect(boxCoxLogLik(ONE_TO_TEN, 0.5)).toBeCloseTo(-10.5107096344, 9); // R: ll(0.5, 1:10)
    // computed with R (METHODS.md §2.2): ℓ(0) = -10.09652, ℓ(1) = -12.53595
    expect(boxCoxLogLik(SKEWED, 0)).toBeCloseTo(-10.096519564193, 9);
    expect(boxCoxLogLik(SKEWED, 1)).toBeCloseTo(-12.535949290142, 9);
    expect(boxCoxLogLik(SKEWED, -1.3)).toBeCloseTo(-11.3757801954, 9); // R: ll(-1.3, x)
  });
});

describe("boxCoxLambda", () => {
  it("finds λ̂ to better than 1e-6", () => {
    // computed with R (METHODS.md §2.2): λ̂ = 0.72196 (R optimize: 0.721964064497), ℓ = -10.41825
    const a = boxCoxFit(ONE_TO_TEN);
    expect(Math.abs(a.lambda - 0.721964064497)).toBeLessThan(1e-6);
    expect(a.logLik).toBeCloseTo(-10.418247364425, 9);
    expect(a.atBoundary).toBe(false);
    // computed with R (METHODS.md §2.2): λ̂ = -0.30300 (R optimize: -0.303014703304), ℓ = -9.95516
    expect(Math.abs(boxCoxLambda(SKEWED) - -0.303014703304)).toBeLessThan(1e-6);
    expect(boxCoxFit(SKEWED).logLik).toBeCloseTo(-9.955163491826, 9);
  });

  it("handles tied values (grouped internally) exactly as R does ungrouped", () => {
    // R: x <- c(1,1,2,2,2,3,5,5,8,13,13); optimize(ll, c(-3,3), maximum=TRUE, tol=1e-12)
    const f = boxCoxFit([13, 1, 2, 5, 2, 1, 3, 8, 2, 5, 13]);
    expect(Math.abs(f.lambda - TIES_LAMBDA)).toBeLessThan(1e-6);
    expect(f.logLik).toBeCloseTo(TIES_LOGLIK, 9);
  });

  it("reports a maximum on the edge of the search interval", () => {
    // One far value on the right: ℓ keeps rising towards λ = -3. R: sapply(c(-3,-2,0), ll, x)
    // = -3.801069 -4.215096 -5.622701 (the bound is a search limit, not an estimate).
    const x = [10, 10.5, 11, 11.2, 20];
    const f = boxCoxFit(x);
    expect(f.lambda).toBe(-3);
    expect(f.logLik).toBeCloseTo(-3.801069, 6);
    expect(f.atBoundary).toBe(true);
  });

  it("rejects data it cannot fit", () => {
    expect(() => boxCoxLambda([1, 2, 0])).toThrow(/not positive/);
    expect(() => boxCoxLambda([1, -2, 3])).toThrow(StatsInputError);
    expect(() => boxCoxLambda([3, 3, 3])).toThrow(/two different values/);
    expect(() => boxCoxLambda([3])).toThrow(/at least 2/);
    expect(() => boxCoxLambda([])).toThrow(StatsInputError);
  });
});

describe("boxCoxTransform and boxCoxInverse", () => {
  it("transforms and inverts (R: (c(4,9)^0.5-1)/0.5 = 2 4)", () => {
    expect(boxCoxTransform(4, 0.5)).toBeCloseTo(2, 14);
    expect(boxCoxTransform([4, 9], 0.5)).toEqual([2, 4]);
    expect(boxCoxTransform(Math.E, 0)).toBe(1);
    // continuity at λ → 0 (the limit is ln x): common practice
    expect(boxCoxTransform(5, 1e-12)).toBeCloseTo(Math.log(5), 10);
    for (const l of [-2.5, -0.303, 0, 0.72, 2]) {
      for (const v of [0.01, 1, 3.7, 250]) {
        // relative 1e-9: at λ = -2.5 the round trip through 1/λ - tiny loses ~7 digits
        expect(Math.abs(boxCoxInverse(boxCoxTransform(v, l), l) / v - 1)).toBeLessThan(1e-9);
      }
    }
    const back = boxCoxInverse([2, 4], 0.5);
    expect(back[0]).toBeCloseTo(4, 12);
    expect(back[1]).toBeCloseTo(9, 12);
  });

  it("refuses an inverse where 1 + λy ≤ 0 and bad input", () => {
    expect(() => boxCoxInverse(5, -0.5)).toThrow(/1 \+ λ·y = -1.5 is not positive/);
    expect(() => boxCoxInverse(-2, 0.5)).toThrow(StatsInputError);
    expect(() => boxCoxTransform(0, 1)).toThrow(/not positive/);
    expect(() => boxCoxTransform(2, Number.NaN)).toThrow(/lambda/);
    expect(() => boxCoxInverse(Number.POSITIVE_INFINITY, 1)).toThrow(/y must be a finite number/);
  });
});

describe("brentMaximize", () => {
  it("finds the top of a parabola and of a skew function (common practice)", () => {
    expect(brentMaximize((x) => -(x - 1) * (x - 1), -3, 3).x).toBeCloseTo(1, 7);
    // maximum of x·exp(-x) is at x = 1 (calculus)
    expect(brentMaximize((x) => x * Math.exp(-x), 0, 5).x).toBeCloseTo(1, 7);
    expect(() => brentMaximize((x) => x, 1, 1)).toThrow(StatsInputError);
  });
});

// R: optimize(function(l) ll(l, c(1,1,2,2,2,3,5,5,8,13,13)), c(-3,3), maximum=TRUE, tol=1e-12)
const TIES_LAMBDA = -0.108647007786;
const TIES_LOGLIK = -12.136477644231;
