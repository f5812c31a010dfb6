import normal from "@stdlib/stats-base-dists-normal";
import { describe, expect, it } from "vitest";
import { lmsDiagnostics } from "@/lib/stats/lms-diagnostics";
import type { LmsModel } from "@/lib/stats/lms-model";
import { StatsInputError } from "@/lib/stats/validate";

// Constant curves L = 1, M = 100, S = 0.1 between 0 and 16 years: a value 100·(1 + 0.1·z) has
// z exactly (the §9 formula with L = 1).
const MODEL: LmsModel = {
  kind: "lms",
  ageTransform: "sqrt",
  ageMin: 0,
  ageMax: 16,
  intervals: 4,
  L: new Array<number>(7).fill(1),
  logM: new Array<number>(7).fill(Math.log(100)),
  logS: new Array<number>(7).fill(Math.log(0.1)),
};

// 480 donors spread evenly in √age (so each of the 12 √age bands holds 40), and in each block
// of 120 (one age group of four) the z-scores are the normal quantiles at (j + 0.5)/120.
const ages = Array.from({ length: 480 }, (_, i) => (4 * (i + 0.5) / 480) ** 2);
const zOf = (i: number) => normal.quantile(((i % 120) + 0.5) / 120, 0, 1);
const values = ages.map((_, i) => 100 * (1 + 0.1 * zOf(i)));

describe("lmsDiagnostics", () => {
  it("gives each donor's z and, by age group, the tail fractions, mean, SD and Q-Q of z", () => {
    const d = lmsDiagnostics(MODEL, ages, values, { groups: 4 });
    d.z.forEach((z, i) => expect(z).toBeCloseTo(zOf(i), 10));
    expect(d.groups).toHaveLength(4);
    for (const g of d.groups) {
      expect(g.n).toBe(120);
      // (j + 0.5)/120 < 0.025 for j = 0, 1, 2 and > 0.975 for j = 117, 118, 119 (arithmetic): 3 of 120 each.
      expect(g.below).toBe(0.025);
      expect(g.above).toBe(0.025);
      expect(g.meanZ).toBeCloseTo(0, 10); // the quantiles are symmetric
      expect(g.qq).toHaveLength(40);
      // Blom's score for rank 1 of 120: Φ⁻¹(0.625/120.25) (R: qnorm(0.625/120.25) = -2.5623…)
      expect(g.qq[0].theoretical).toBeCloseTo(normal.quantile(0.625 / 120.25, 0, 1), 12);
      expect(g.qq[0].z).toBeCloseTo(zOf(0), 10);
      expect(g.qq[0].worm).toBeCloseTo(g.qq[0].z - g.qq[0].theoretical, 12);
    }
    expect(d.groups[0].ageFrom).toBe(ages[0]);
    expect(d.groups[3].ageTo).toBe(ages[479]);
    expect(d.warnings).toEqual([]);
  });

  it("warns where the curves miss an age range", () => {
    // The oldest group's values one SD higher: mean z 1, and z + 1 > 1.96 where (j + 0.5)/120
    // > Φ(0.96) = 0.8315, j = 100 … 119: 20 of its 120.
    const shifted = values.map((v, i) => (i >= 360 ? 100 * (1 + 0.1 * (zOf(i) + 1)) : v));
    const d = lmsDiagnostics(MODEL, ages, shifted, { groups: 4 });
    expect(d.groups[3].above).toBe(20 / 120);
    expect(d.groups[3].meanZ).toBeCloseTo(1, 10);
    const where = `ages ${Math.round(ages[360] * 100) / 100}–${Math.round(ages[479] * 100) / 100} years (120 donors)`;
    expect(d.warnings).toEqual([
      `${where}: 16.7% lie above the 97.5th centile curve, not about 2.5%; the curves fit this age range poorly`,
      `${where}: the mean z is 1.00, not about 0; the median curve misses this age range`,
    ]);
  });

  it("warns where an age range holds few donors", () => {
    // Donors from 9 years up to 11.11 removed: the √age band [3, 3.333] (ages 9 to 11.11) is empty.
    const keep = ages.map((a, i) => i).filter((i) => ages[i] < 9 || ages[i] >= (10 / 3) ** 2);
    const d = lmsDiagnostics(MODEL, keep.map((i) => ages[i]), keep.map((i) => values[i]), { groups: 4 });
    expect(d.warnings).toContain("ages 9–11.11 years hold only 0 donors (fewer than 30); the curves there rest on few results");
  });

  it("refuses donors outside the curves' ages", () => {
    expect(() => lmsDiagnostics(MODEL, [1, 17], [100, 100])).toThrow(
      new StatsInputError("age 17 years is outside the curves' age range, 0 to 16 years"),
    );
    expect(() => lmsDiagnostics(MODEL, [1, 2], [100])).toThrow(new StatsInputError("ages and values differ in length (2 and 1)"));
  });
});
