import { describe, expect, it } from "vitest";
import { ageWords, lmsCurvePoints, lmsModelOf, lmsRows, lmsScopeLabel, lmsTableAges } from "@/lib/scoring/lms-curves-view";
import { lmsAsGaussian, referenceCurve } from "@/lib/scoring/reference-curve";

// Constant curves L = 0, M = 100, S = 0.1 (equal B-spline coefficients sum to that constant; de Boor 1978).
const model = {
  kind: "lms" as const,
  ageTransform: "sqrt" as const,
  ageMin: 0.027,
  ageMax: 17.974,
  intervals: 1,
  L: [0, 0, 0, 0],
  logM: Array(4).fill(Math.log(100)),
  logS: Array(4).fill(Math.log(0.1)),
};

describe("LMS curves as pages show them", () => {
  it("tables the limits at the curves' ends and round ages between", () => {
    expect(lmsTableAges(model)).toEqual([0.027, 1 / 12, 0.25, 0.5, 1, 2, 3, 4, 5, 6, 8, 10, 12, 13, 14, 15, 16, 17, 17.974]);
    // R: print(100*exp(c(-1,1)*0.1*qnorm(0.975)), digits=12) → 82.2015195198 121.6522523965
    const [row] = lmsRows(model, [4]);
    expect(row.low).toBeCloseTo(82.2015195198, 9);
    expect(row.median).toBeCloseTo(100, 10);
    expect(row.high).toBeCloseTo(121.6522523965, 9);
  });

  it("samples the curves evenly in √age, from the first age to the last", () => {
    const points = lmsCurvePoints(model, 4);
    expect(points.map((p) => p.ageYears)[0]).toBe(0.027);
    expect(points.at(-1)?.ageYears).toBe(17.974);
    expect(points).toHaveLength(5);
  });

  it("says ages and scopes in words", () => {
    expect([ageWords(0.25), ageWords(1 / 12), ageWords(1), ageWords(4.498630137), ageWords(17.974)]).toEqual(["3 months", "1 month", "1 year", "4.5 years", "17.97 years"]);
    expect(lmsScopeLabel({ sex: "F", model })).toBe("F, age curves 0.03 to 17.97 years");
    expect(lmsScopeLabel({ sex: null, model: { kind: "gaussian" } })).toBeNull();
    expect(lmsModelOf({ ...model, L: [0] })).toBeNull();
  });

  it("draws the distribution at an age as the normal on the Box-Cox scale with λ = L", () => {
    // z = ((x/M)^L − 1)/(L·S) equals (g(x) − g(M))/(M^L·S), g(x) = (x^L − 1)/L (METHODS.md §9, algebra).
    const p = { L: 0.5, M: 200, S: 0.2 };
    const g = lmsAsGaussian(p);
    expect(g).toEqual({ kind: "gaussian", transform: "box-cox", lambda: 0.5, mean: (Math.sqrt(200) - 1) / 0.5, sd: Math.sqrt(200) * 0.2 });
    const x = 250;
    expect(((Math.sqrt(x) - 1) / 0.5 - g.mean) / g.sd).toBeCloseTo(((x / 200) ** 0.5 - 1) / (0.5 * 0.2), 12);
    expect(lmsAsGaussian({ L: 0, M: 100, S: 0.1 })).toEqual({ kind: "gaussian", transform: "ln", lambda: null, mean: Math.log(100), sd: 0.1 });
    expect(referenceCurve(g, { low: 150, high: 260, z: 1 })?.axis).toBe("box-cox");
  });
});
