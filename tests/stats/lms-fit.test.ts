import normal from "@stdlib/stats-base-dists-normal";
import { describe, expect, it } from "vitest";
import { fitLms } from "@/lib/stats/lms-fit";
import { lmsAt, lmsModelSchema } from "@/lib/stats/lms-model";
import { createRandom } from "@/lib/stats/random";
import { StatsInputError } from "@/lib/stats/validate";
import { lmsDonors } from "@/tests/support/lms-fixtures";

/** Donors from constant curves L = 0.5, M = 100, S = 0.1 (the §9 centile formula), ages uniform on [0, 18]. */
function constantDonors(n: number, seed: number): { ages: number[]; values: number[] } {
  const rng = createRandom(seed);
  const ages: number[] = [];
  const values: number[] = [];
  for (let i = 0; i < n; i++) {
    ages.push(18 * rng.nextFloat());
    const z = normal.quantile((rng.nextUint32() + 0.5) / 0x100000000, 0, 1);
    values.push(100 * Math.pow(1 + 0.5 * 0.1 * z, 1 / 0.5));
  }
  return { ages, values };
}

describe("fitLms", () => {
  it("recovers constant curves", () => {
    const { ages, values } = constantDonors(2000, 11);
    const fit = fitLms(ages, values);
    expect(fit.converged).toBe(true);
    // The criterion should find nothing to fit in age: each curve at the penalty's straight line.
    expect(fit.edf.L).toBeLessThan(2.5);
    expect(fit.edf.M).toBeLessThan(3);
    expect(fit.edf.S).toBeLessThan(2.5);
    for (const age of [0.5, 6, 12, 17.5]) {
      const p = lmsAt(fit.model, age);
      // Tolerances: 2,000 donors give SE(ln M) ≈ S/√n ≈ 0.0022 and SE(ln S) ≈ 1/√(2n) ≈ 0.016
      // for a constant curve; a line in √age has at most about twice that at the ends; L's
      // SE is larger (≈ 0.1 here). The bounds are about four of those.
      expect(Math.abs(Math.log(p.M / 100))).toBeLessThan(0.02);
      expect(Math.abs(Math.log(p.S / 0.1))).toBeLessThan(0.13);
      expect(Math.abs(p.L - 0.5)).toBeLessThan(0.6);
    }
  }, 60_000);

  it("gives the same curves for the same data and seed, to the bit", () => {
    const { ages, values } = lmsDonors(20261102);
    const a = fitLms(ages, values, { seed: 5 });
    const b = fitLms(ages, values, { seed: 5 });
    expect(b.model).toEqual(a.model);
    expect(b.edf).toEqual(a.edf);
    expect(a.seed).toBe(5);
    expect(lmsModelSchema.parse(JSON.parse(JSON.stringify(a.model)))).toEqual(a.model);
    // Each edf lies between the penalty's null space (a straight line in τ, 2) and the 27
    // coefficients of its spline.
    for (const e of [a.edf.L, a.edf.M, a.edf.S]) {
      expect(e).toBeGreaterThan(2 - 1e-6);
      expect(e).toBeLessThan(27);
    }
    expect(a.criterion.name).toBe("GAIC");
    expect(a.criterion.penalty).toBe(3);
    expect(a.model.ageMin).toBe(Math.min(...ages));
    expect(a.model.ageMax).toBe(Math.max(...ages));
  }, 60_000);

  it("refuses bad donors with a readable message", () => {
    const ages = Array.from({ length: 60 }, (_, i) => i / 4);
    const values = Array.from({ length: 60 }, (_, i) => 100 + (i % 7));
    expect(() => fitLms(ages.slice(0, 49), values.slice(0, 49))).toThrow(
      new StatsInputError("ages needs at least 50 values (got 49)"),
    );
    expect(() => fitLms(ages, values.slice(0, 59))).toThrow(
      new StatsInputError("ages and values differ in length (60 and 59)"),
    );
    expect(() => fitLms(ages.map((a, i) => (i === 3 ? -1 : a)), values)).toThrow(new StatsInputError("ages[3] = -1 is negative"));
    expect(() => fitLms(ages, values.map((v, i) => (i === 8 ? 0 : v)))).toThrow(
      new StatsInputError("values[8] = 0 is not positive; the LMS method needs values > 0"),
    );
    expect(() => fitLms(ages.map(() => 4), values)).toThrow(
      new StatsInputError("all donors have the same age; curves in age need a spread of ages"),
    );
    expect(() => fitLms(ages, values, { intervals: 2.5 })).toThrow(
      new StatsInputError("the number of spline intervals must be an integer from 4 to 200 (got 2.5)"),
    );
    expect(() => fitLms(ages, values, { criterionPenalty: 0 })).toThrow(
      new StatsInputError("the criterion's penalty must be a positive number (got 0)"),
    );
  });
});
