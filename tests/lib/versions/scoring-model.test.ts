import { describe, expect, it } from "vitest";
import { scoreEmpirical, scoreGaussian, type ScoringModel } from "@/lib/scoring";
import { estimateReferenceInterval, type TransformOption } from "@/lib/stats/estimate";
import { createRandom } from "@/lib/stats/random";
import { ageYearsToDays } from "@/lib/versions/age-days";
import { firstOverlap, partitionsOverlap } from "@/lib/versions/overlap";
import { PARTITION_METHODS, publicModel, scoringModelFor, ScoringModelError } from "@/lib/versions/scoring-model";

/** n values from a seeded generator: log-normal (Box-Muller), full precision, so no two tie. */
function logNormal(n: number, seed: number, sdLog: number): number[] {
  const random = createRandom(seed);
  return Array.from({ length: n }, () => {
    const u1 = 1 - random.nextFloat();
    const z = Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * random.nextFloat());
    return 4.5 * Math.exp(sdLog * z);
  });
}

function score(model: ScoringModel, x: number): number {
  if (model.kind === "gaussian") return scoreGaussian(model, x).percentile;
  if (model.kind === "empirical") return scoreEmpirical(model, x).percentile;
  throw new Error(`scoringModelFor never builds a ${model.kind} model`);
}

// Expected: a 95% reference interval runs from the 2.5th to the 97.5th percentile (DESIGN.md,
// "The job"; CLSI EP28-A3c). Tolerance 1e-9 percentage points: the only error left is floating
// rounding in carrying a limit back and forth through the transform (about 1e-13 here).
describe("scoringModelFor puts the chosen limits at percentiles 2.5 and 97.5", () => {
  const cases: [string, number[], TransformOption][] = [
    ["100 log-normal values, auto scale", logNormal(100, 21, 0.25), "auto"],
    ["100 log-normal values, Box-Cox", logNormal(100, 22, 0.4), "box-cox"],
    ["80 values on the raw scale", logNormal(80, 23, 0.05), "none"],
    ["150 values on the ln scale", logNormal(150, 24, 0.3), "ln"],
  ];
  for (const [what, values, transform] of cases) {
    const document = estimateReferenceInterval(values, { outliers: "none", transform, seed: 5 });
    for (const method of PARTITION_METHODS) {
      const limits = document[method];
      if (limits.lower === null || limits.upper === null) {
        it(`${what}: ${method} has no limits, and no model is made`, () => {
          expect(() => scoringModelFor({ document, method, values })).toThrow(new ScoringModelError(`the estimate has no ${method} limits`));
        });
        continue;
      }
      it(`${what}: ${method}`, () => {
        const model = scoringModelFor({ document, method, values });
        expect(model.kind).toBe(method === "nonparametric" ? "empirical" : "gaussian");
        expect(score(model, limits.lower!)).toBeCloseTo(2.5, 9);
        expect(score(model, limits.upper!)).toBeCloseTo(97.5, 9);
      });
    }
  }

  it("makes the robust model on the parametric scale, centred between the transformed limits", () => {
    const values = logNormal(100, 22, 0.4);
    const document = estimateReferenceInterval(values, { outliers: "none", transform: "box-cox", seed: 5 });
    const model = scoringModelFor({ document, method: "robust", values });
    expect(model).toMatchObject({ kind: "gaussian", transform: "box-cox", lambda: document.parametric.lambda });
  });

  it("enters censored values at their limit in the empirical model and hides the values from answers", () => {
    const values = [{ value: 1, side: "below" as const }, ...logNormal(60, 3, 0.2)];
    const document = estimateReferenceInterval(values, { outliers: "none" });
    const model = scoringModelFor({ document, method: "nonparametric", values });
    expect(model.kind === "empirical" && model.values[0]).toBe(1);
    expect(publicModel(model)).toEqual({ kind: "empirical", n: 61 });
  });
});

describe("age bands in days and overlapping partitions", () => {
  it("turns years into days by Math.round(years × 365.25)", () => {
    // 18 × 365.25 = 6574.5 → 6575; 120 × 365.25 = 43830 (arithmetic by hand).
    expect([ageYearsToDays(0), ageYearsToDays(18), ageYearsToDays(120), ageYearsToDays(null)]).toEqual([0, 6575, 43830, null]);
  });

  it("finds partitions that some patient would belong to twice", () => {
    const female = { sex: "F" as const, ageFromDays: null, ageToDays: null };
    const male = { sex: "M" as const, ageFromDays: null, ageToDays: null };
    const everyone = { sex: null, ageFromDays: null, ageToDays: null };
    const child = { sex: null, ageFromDays: 0, ageToDays: 6575 };
    const adult = { sex: null, ageFromDays: 6575, ageToDays: 43830 };
    expect(partitionsOverlap(female, male)).toBe(false);
    expect(partitionsOverlap(child, adult)).toBe(false);
    expect(partitionsOverlap(female, adult)).toBe(true);
    expect(firstOverlap([female, male, everyone])).toEqual([0, 2]);
    expect(firstOverlap([child, adult])).toBeNull();
  });
});
