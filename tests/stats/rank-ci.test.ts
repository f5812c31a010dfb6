import { describe, expect, it } from "vitest";
import { binomialRankCi } from "@/lib/stats/rank-ci";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

// METHODS.md §1.3, generated there with the equal-tail binomial rule (computed with R); its
// first rows agree with the published CLSI EP28-A3c Table 8 (from memory, per METHODS.md).
// [first n, last n, r1, r2]
const TABLE: [number, number, number, number][] = [
  [119, 132, 1, 7], [133, 160, 1, 8], [161, 187, 1, 9], [188, 189, 2, 9], [190, 218, 2, 10],
  [219, 248, 2, 11], [249, 249, 2, 12], [250, 279, 3, 12], [280, 307, 3, 13], [308, 309, 4, 13],
  [310, 340, 4, 14], [341, 363, 4, 15], [364, 372, 5, 15], [373, 403, 5, 16], [404, 417, 5, 17],
  [418, 435, 6, 17], [436, 468, 6, 18], [469, 470, 6, 19], [471, 500, 7, 19], [501, 522, 7, 20],
  [523, 533, 8, 20], [534, 565, 8, 21], [566, 574, 8, 22], [575, 598, 9, 22], [599, 624, 9, 23],
  [625, 631, 10, 23], [632, 665, 10, 24], [666, 674, 10, 25], [675, 698, 11, 25],
  [699, 724, 11, 26], [725, 732, 12, 26], [733, 765, 12, 27], [766, 773, 12, 28],
  [774, 799, 13, 28], [800, 822, 13, 29], [823, 833, 14, 29], [834, 867, 14, 30],
  [868, 871, 14, 31], [872, 901, 15, 31], [902, 919, 15, 32], [920, 935, 16, 32],
  [936, 967, 16, 33], [968, 970, 17, 33], [971, 1000, 17, 34],
];

describe("binomialRankCi", () => {
  it("gives ranks 1-7 and 114-120 for n = 120 with coverage 0.92047", () => {
    // computed with R (METHODS.md §1.2); R: pbinom(6,120,.025)-pbinom(0,120,.025) = 0.920466554592726
    const r = binomialRankCi(120);
    expect(r).not.toBeNull();
    expect(r!.lower).toEqual([1, 7]);
    expect(r!.upper).toEqual([114, 120]);
    // 1e-12: both are sums of the same binomial probabilities in double precision
    expect(r!.coverage).toBeCloseTo(0.920466554592726, 12);
  });

  it("reproduces every row of the METHODS.md §1.3 table, n = 119 to 1000", () => {
    for (const [first, last, r1, r2] of TABLE) {
      for (let n = first; n <= last; n++) {
        const r = binomialRankCi(n);
        expect(r?.lower, `n = ${n}`).toEqual([r1, r2]);
        expect(r?.upper, `n = ${n}`).toEqual([n + 1 - r2, n + 1 - r1]);
      }
    }
  });

  it("agrees with the R-generated rank table (scripts/fixtures/reference-limits.R)", () => {
    for (const [n, r1, r2] of fixture.rankTable) expect(binomialRankCi(n)?.lower).toEqual([r1, r2]);
  });

  it("has no interval below 119 values", () => {
    // computed with R (METHODS.md §1.1): 119 is the smallest n with 0.975^n ≤ 0.05
    expect(binomialRankCi(118)).toBeNull();
    expect(binomialRankCi(39)).toBeNull();
    expect(binomialRankCi(1)).toBeNull();
  });

  it("works for large n in constant time", () => {
    // R: n <- 1e6; k1 <- qbinom(.05,n,.025); the CI stays close to n·p = 25000 ± 1.645·156
    const r = binomialRankCi(1_000_000)!;
    expect(r.lower[0]).toBeGreaterThan(24700);
    expect(r.lower[1]).toBeLessThan(25300);
    expect(r.coverage).toBeGreaterThanOrEqual(0.9);
  });

  it("rejects bad input", () => {
    expect(() => binomialRankCi(0)).toThrow(StatsInputError);
    expect(() => binomialRankCi(12.5)).toThrow(/positive integer/);
    expect(() => binomialRankCi(120, 0)).toThrow(/strictly between/);
    expect(() => binomialRankCi(120, 0.9)).toThrow(/at most 0.5/);
  });
});
