import { describe, expect, it } from "vitest";
import chisquare from "@stdlib/stats-base-dists-chisquare";
import { createRandom, xoshiro128ss } from "@/lib/stats/random";
import { StatsInputError } from "@/lib/stats/validate";

describe("xoshiro128**", () => {
  it("follows the published recurrence", () => {
    // Derived by hand from Blackman & Vigna's algorithm with state {1, 2, 3, 4}:
    // out1 = rotl(2·5, 7)·9 = 11520; the state becomes {7, 0, 1026, 12288}, so out2 = 0;
    // then {12295, 1029, 1029, 25165824}, out3 = rotl(1029·5, 7)·9 = 5927040.
    const g = xoshiro128ss([1, 2, 3, 4]);
    expect(g.nextUint32()).toBe(11520);
    expect(g.nextUint32()).toBe(0);
    expect(g.nextUint32()).toBe(5927040);
  });

  it("refuses an all-zero state", () => {
    expect(() => xoshiro128ss([0, 0, 0, 0])).toThrow(/all zero/);
  });
});

describe("createRandom", () => {
  it("is reproducible for a seed and differs between seeds", () => {
    const a = createRandom(42);
    const b = createRandom(42);
    const c = createRandom(43);
    const sa = Array.from({ length: 8 }, () => a.nextUint32());
    expect(Array.from({ length: 8 }, () => b.nextUint32())).toEqual(sa);
    expect(Array.from({ length: 8 }, () => c.nextUint32())).not.toEqual(sa);
    // Pinned output of this implementation: stored seeds must keep reproducing stored numbers.
    expect(sa.slice(0, 2)).toEqual(PINNED_SEED_42);
  });

  it("draws uniform integers without bias", () => {
    const g = createRandom(7);
    const counts = new Array(10).fill(0);
    const draws = 20000;
    for (let i = 0; i < draws; i++) counts[g.nextInt(10)]++;
    const e = draws / 10;
    const x2 = counts.reduce((s, o) => s + ((o - e) * (o - e)) / e, 0);
    // Goodness of fit, 9 df (common practice). The seed is fixed, so this is deterministic; a
    // biased generator would give p far below 0.001.
    expect(1 - chisquare.cdf(x2, 9)).toBeGreaterThan(0.001);
    const f = g.nextFloat();
    expect(f).toBeGreaterThanOrEqual(0);
    expect(f).toBeLessThan(1);
    expect(g.nextInt(1)).toBe(0);
  });

  it("rejects a seed that is not an integer, and bad bounds", () => {
    expect(() => createRandom(1.5)).toThrow(StatsInputError);
    expect(() => createRandom(Number.NaN)).toThrow(/seed/);
    expect(() => createRandom(1).nextInt(0)).toThrow(/bound/);
  });
});

// Printed by this implementation on first run (createRandom(42), two draws).
const PINNED_SEED_42 = [2837322924, 544945897];
