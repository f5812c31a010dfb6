import { describe, expect, it } from "vitest";
import { lmsAt, lmsCentileAt, lmsModelSchema, lmsZAt, type LmsModel } from "@/lib/stats/lms-model";
import { StatsInputError } from "@/lib/stats/validate";

const constant = (v: number, k: number) => new Array<number>(k).fill(v);

// A hand-made model on 4 intervals between 0 and 16 years, so τ = √age/4.
const FLAT: LmsModel = {
  kind: "lms",
  ageTransform: "sqrt",
  ageMin: 0,
  ageMax: 16,
  intervals: 4,
  L: constant(0.3, 7),
  logM: constant(Math.log(150), 7),
  logS: constant(Math.log(0.12), 7),
};

describe("the stored LMS model", () => {
  it("gives constant curves from constant coefficients (the B-splines sum to one)", () => {
    for (const age of [0, 0.1, 1, 4, 9.5, 16]) {
      const p = lmsAt(FLAT, age);
      expect(p.L).toBeCloseTo(0.3, 14);
      expect(p.M).toBeCloseTo(150, 11);
      expect(p.S).toBeCloseTo(0.12, 14);
    }
  });

  it("is linear in τ = (√age − √ageMin)/(√ageMax − √ageMin) for Greville coefficients", () => {
    // cₖ = (k − 1)/J reproduces L(τ) = τ (de Boor 1978); with ageMin 0 and ageMax 16, τ = √age/4.
    const model = { ...FLAT, L: Array.from({ length: 7 }, (_, k) => (k - 1) / 4) };
    expect(lmsAt(model, 4).L).toBeCloseTo(0.5, 14); // √4/4
    expect(lmsAt(model, 2.25).L).toBeCloseTo(0.375, 14); // √2.25/4 = 1.5/4
    expect(lmsAt(model, 16).L).toBeCloseTo(1, 14);
    // With ageMin 1 and ageMax 9: τ = (√age − 1)/2, so age 4 gives 0.5.
    expect(lmsAt({ ...model, ageMin: 1, ageMax: 9 }, 4).L).toBeCloseTo(0.5, 14);
  });

  it("scores a value at an exact age with the §9 formulas", () => {
    // Constant curves L = 0.3, M = 150, S = 0.12: z of 180 is ((180/150)^0.3 − 1)/(0.3·0.12)
    // (R: ((180/150)^0.3 - 1)/(0.3*0.12) = 1.56166578998), at any age in range.
    expect(lmsZAt(FLAT, 7.25, 180)).toBeCloseTo(1.56166578998, 10);
    // The 97.5th centile: 150·(1 + 0.3·0.12·1.959964)^(1/0.3) (§9, z = qnorm(0.975)).
    expect(lmsCentileAt(FLAT, 7.25, 97.5)).toBeCloseTo(150 * (1 + 0.3 * 0.12 * 1.959963984540054) ** (1 / 0.3), 9);
    expect(() => lmsZAt(FLAT, 20, 180)).toThrow(new StatsInputError("age 20 years is outside the curves' age range, 0 to 16 years"));
  });

  it("survives JSON and gives the same numbers to the last bit", () => {
    const model = { ...FLAT, L: [0.1, 0.25, 0.31, 0.2, 0.4, 0.33, 0.3], logS: [-2.1, -2, -2.2, -1.9, -2, -2.05, -2.1] };
    const stored = lmsModelSchema.parse(JSON.parse(JSON.stringify(model)));
    for (const age of [0.01, 0.7, 3.3, 12.25, 15.999]) expect(lmsAt(stored, age)).toEqual(lmsAt(model, age));
  });

  it("refuses ages outside its range: the curves are not extrapolated", () => {
    expect(() => lmsAt({ ...FLAT, ageMin: 1 }, 0.5)).toThrow(
      new StatsInputError("age 0.5 years is outside the curves' age range, 1 to 16 years"),
    );
    expect(() => lmsAt(FLAT, 16.01)).toThrow(new StatsInputError("age 16.01 years is outside the curves' age range, 0 to 16 years"));
    expect(() => lmsAt(FLAT, Number.NaN)).toThrow(new StatsInputError("age must be a finite number (got NaN)"));
  });

  it("validates a stored model with zod", () => {
    expect(lmsModelSchema.safeParse(FLAT).success).toBe(true);
    const issues = (m: unknown) => {
      const r = lmsModelSchema.safeParse(m);
      return r.success ? [] : r.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`);
    };
    expect(issues({ ...FLAT, ageMax: 0 })).toEqual(["ageMax: ageMax must be greater than ageMin"]);
    expect(issues({ ...FLAT, L: [0.3] })).toEqual(["intervals: L, logM and logS each need intervals + 3 coefficients"]);
    expect(issues({ ...FLAT, ageMin: -1 })).toEqual(["ageMin: ageMin must not be negative"]);
    expect(issues({ ...FLAT, intervals: 201 })[0]).toMatch(/^intervals: /);
    expect(issues({ ...FLAT, kind: "gaussian" })[0]).toMatch(/^kind: /);
    expect(issues({ ...FLAT, logM: [1, 2, 3, 4, 5, 6, Number.NaN] })[0]).toMatch(/^logM\.6: /);
  });
});
