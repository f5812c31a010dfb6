import { describe, expect, it } from "vitest";
import normal from "@stdlib/stats-base-dists-normal";
import { skewness } from "@/lib/stats/descriptive";
import { estimateReferenceInterval } from "@/lib/stats/estimate";
import { createRandom } from "@/lib/stats/random";
import { shapiroWilk } from "@/lib/stats/shapiro-wilk";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

const set = (name: string) => fixture.sets.find((s) => s.name === name)!;

describe("estimateReferenceInterval", () => {
  it("has exactly the document shape of the estimate contract", () => {
    // DESIGN.md: the contract's fields (n … warnings) stay; proposed, screening and provenance
    // were added after them.
    const d = estimateReferenceInterval(set("lognormal-80").values);
    expect(Object.keys(d)).toEqual([
      "n", "excluded", "nonparametric", "parametric", "robust", "normality", "recommended", "warnings",
      "proposed", "screening", "provenance",
    ]);
    expect(Object.keys(d.screening)).toEqual(["outliers", "rule", "mode", "applied", "valuesGiven"]);
    expect(Object.keys(d.provenance)).toEqual(["options", "bootstrap", "robust", "engine"]);
    expect(Object.keys(d.nonparametric)).toEqual(["lower", "upper", "lowerCi", "upperCi"]);
    expect(Object.keys(d.parametric)).toEqual([
      "transform", "lambda", "mean", "sd", "lower", "upper", "lowerCi", "upperCi",
    ]);
    expect(Object.keys(d.robust)).toEqual(["lower", "upper", "lowerCi", "upperCi"]);
    expect(Object.keys(d.normality)).toEqual(["shapiroWilk", "andersonDarling"]);
    expect(Object.keys(d.normality.andersonDarling!)).toEqual(["a2", "p"]);
  });

  it("picks the scale with the highest Shapiro-Wilk W and reports normality on it", () => {
    const x = set("lognormal-80").values;
    const d = estimateReferenceInterval(x, { outliers: "none" });
    const ln = x.map(Math.log);
    // On lognormal data ln or Box-Cox beats the raw scale (R: shapiro.test on each scale).
    expect(d.parametric.transform).not.toBe("none");
    expect(shapiroWilk(ln).w).toBeGreaterThan(shapiroWilk(x).w);
    // limits agree with the R fixture for the chosen scale (1e-6 relative; see parametric tests)
    const ref = d.parametric.transform === "ln" ? set("lognormal-80").ln : set("lognormal-80").boxCox;
    expect(Math.abs(d.parametric.lower! / ref.lower - 1)).toBeLessThan(1e-6);
    expect(d.normality.shapiroWilk!.w).toBeGreaterThan(shapiroWilk(x).w);
    expect(d.n).toBe(80);
    expect(d.recommended).toBe("parametric");
  });

  it("uses binomial ranks and no bootstrap from 119 values, nonparametric recommended", () => {
    const x = set("gaussian-1000").values;
    const d = estimateReferenceInterval(x, { outliers: "none", transform: "none" });
    // R fixture: type-6 quantiles and x(17), x(34) … (scripts/fixtures/reference-limits.R)
    expect(d.nonparametric.lower).toBeCloseTo(set("gaussian-1000").quantile6[0], 9);
    expect(d.nonparametric.lowerCi).toEqual(set("gaussian-1000").rankCi!.lowerCi);
    expect(d.recommended).toBe("nonparametric");
    expect(d.robust).toEqual({ lower: null, upper: null, lowerCi: null, upperCi: null });
    expect(d.warnings.join(" ")).not.toMatch(/bootstrap/);
  });

  describe("outlier screening", () => {
    // 120 Gaussian values from R (scripts/fixtures/reference-limits.R) and one gross error.
    const x = [...set("gaussian-120").values, 46];
    const sorted = [...x].sort((a, b) => a - b);

    it("only proposes by default: nothing excluded, limits on every value given", () => {
      const d = estimateReferenceInterval(x, { outliers: "horn", transform: "none" });
      expect(d.screening).toEqual({ outliers: "horn", rule: "horn", mode: "propose", applied: false, valuesGiven: 121 });
      expect(d.excluded).toEqual([]);
      expect(d.proposed).toContainEqual(expect.objectContaining({ value: 46, reason: "horn", index: 120 }));
      expect(d.n).toBe(121);
      // Type-6 limits of all 121 values, worked by hand (Hyndman & Fan definition 6):
      // r = 0.025·122 = 3.05 and 0.975·122 = 118.95. 1e-12: one interpolation.
      expect(d.nonparametric.lower).toBeCloseTo(sorted[2] + 0.05 * (sorted[3] - sorted[2]), 12);
      expect(d.nonparametric.upper).toBeCloseTo(sorted[117] + 0.95 * (sorted[118] - sorted[117]), 12);
      // Raw-scale mean of all 121 values, the gross error included (plain arithmetic).
      expect(d.parametric.mean).toBeCloseTo(x.reduce((a, b) => a + b, 0) / 121, 10);
      expect(d.warnings.join(" ")).toMatch(/Horn screen proposes \d+ values? for exclusion/);
    });

    it("with screening apply excludes the proposals, lists them in both lists, and says so", () => {
      const d = estimateReferenceInterval(x, { outliers: "horn", screening: "apply" });
      expect(d.screening).toEqual({ outliers: "horn", rule: "horn", mode: "apply", applied: true, valuesGiven: 121 });
      expect(d.excluded).toContainEqual(expect.objectContaining({ value: 46, reason: "horn" }));
      expect(d.proposed).toEqual(d.excluded);
      expect(d.n).toBe(121 - d.excluded.length);
      expect(d.provenance.options).toEqual({ outliers: "horn", screening: "apply", transform: "auto", seed: 1 });
    });

    it("gives each proposal the rule's statistic", () => {
      // Dixon/Reed (METHODS.md §4.1), by hand on the sorted data: D = 46 − x(120), R = 46 − x(1).
      const dixon = estimateReferenceInterval(x, { outliers: "dixon", screening: "apply" });
      expect(dixon.excluded).toHaveLength(1);
      const de = dixon.excluded[0];
      expect(de).toMatchObject({ value: 46, reason: "dixon", index: 120 });
      expect(de.evidence).toMatchObject({ rule: "dixon", side: "high", kind: "single", threshold: 1 / 3, step: 1 });
      expect(de.evidence.rule === "dixon" && de.evidence.ratio).toBeCloseTo((46 - sorted[119]) / (46 - sorted[0]), 12);
      expect(de.explanation).toMatch(/^D\/R = 0\.\d{4} ≥ 1\/3 \(high\)$/);
      // Tukey (METHODS.md §4.2), type-7 quartiles by hand: ranks 1 + 0.25·120 = 31 and 91, whole
      // numbers, so Q1 = x(31) and Q3 = x(91).
      const tukey = estimateReferenceInterval(x, { outliers: "tukey", screening: "apply" });
      const te = tukey.excluded.find((e) => e.value === 46)!;
      const iqr = sorted[90] - sorted[30];
      expect(te.evidence).toEqual({
        rule: "tukey",
        side: "high",
        value: 46,
        q1: sorted[30],
        q3: sorted[90],
        k: 1.5,
        lowerFence: sorted[30] - 1.5 * iqr,
        upperFence: sorted[90] + 1.5 * iqr,
      });
      // Horn: the Box-Cox value lies beyond the upper fence of its round (checked against R in
      // tests/stats/outliers-horn.test.ts).
      const horn = estimateReferenceInterval(x, { outliers: "horn" }).proposed.find((e) => e.value === 46)!;
      expect(horn.evidence.rule).toBe("horn");
      if (horn.evidence.rule === "horn") {
        expect(horn.evidence.transformedValue).toBeGreaterThan(horn.evidence.upperFence);
        expect(horn.evidence).toMatchObject({ side: "high", k: 1.5, round: 1 });
      }
    });

    it("excludes nothing and proposes nothing without a screen", () => {
      const none = estimateReferenceInterval(x, { outliers: "none", screening: "apply" });
      expect(none.excluded).toEqual([]);
      expect(none.proposed).toEqual([]);
      expect(none.n).toBe(x.length);
      expect(none.screening).toMatchObject({ rule: null, applied: false });
    });
  });

  it("records what is needed to reproduce it", () => {
    const d = estimateReferenceInterval(set("gamma-45").values, { seed: 7 });
    // 45 values: both the nonparametric (below 119) and the robust CIs are bootstrapped.
    expect(d.provenance).toEqual({
      options: { outliers: "horn", screening: "propose", transform: "auto", seed: 7 },
      bootstrap: { method: "percentile", generator: "xoshiro128**", replicates: 1000, level: 0.9, usedFor: ["nonparametric", "robust"] },
      // The constants chosen in lib/stats/robust-horn.ts (its header says why): 0.6745, 3.7, 9 raw MADs.
      robust: { method: "Horn-Pesce-Copeland 1998, biweight", madNormal: 0.6745, cLocation: 3.7, cScale: 9 * 0.6745 },
      // lib/stats cannot know the engine; lib/engine.ts stamps it.
      engine: null,
    });
  });

  it("falls back to Tukey on the raw scale when Horn meets a non-positive value", () => {
    const x = set("gaussian-60").values.map((v) => v - 140);
    const d = estimateReferenceInterval(x);
    expect(d.warnings.join(" ")).toMatch(/Tukey fences on the raw scale/);
    expect(d.screening).toMatchObject({ outliers: "horn", rule: "tukey" });
    expect(d.parametric.transform).toBe("none");
  });

  it("gives the same document for the same input and seed", () => {
    const x = set("gamma-45").values;
    const a = estimateReferenceInterval(x, { seed: 7 });
    expect(estimateReferenceInterval(x, { seed: 7 })).toEqual(a);
    expect(estimateReferenceInterval(x, { seed: 8 }).robust).not.toEqual(a.robust);
  });

  it("gives R's raw-scale parametric limits for transform none", () => {
    // R (scripts/fixtures/reference-limits.R): mean(x) ± qnorm(.975)·sd(x) on gaussian-60;
    // 1e-9 relative: the same closed formula in double precision.
    const ref = set("gaussian-60");
    const d = estimateReferenceInterval(ref.values, { outliers: "none", transform: "none" });
    expect(Math.abs(d.parametric.mean! / ref.raw.mean - 1)).toBeLessThan(1e-9);
    expect(Math.abs(d.parametric.sd! / ref.raw.sd - 1)).toBeLessThan(1e-9);
    expect(Math.abs(d.parametric.lower! / ref.raw.lower - 1)).toBeLessThan(1e-9);
    expect(Math.abs(d.parametric.upper! / ref.raw.upper - 1)).toBeLessThan(1e-9);
  });

  it("above 5000 values scores each scale by |skewness| and leaves Shapiro-Wilk null", () => {
    // 6000 lognormal values drawn with Bellwether's seeded generator and @stdlib's Φ⁻¹; on such
    // data ln or Box-Cox is markedly less skewed than the raw scale (common practice: the
    // log of a lognormal sample is Gaussian).
    const random = createRandom(2026);
    const x = Array.from({ length: 6000 }, () => Math.exp(1 + 0.4 * normal.quantile(random.nextFloat() * 0.999998 + 0.000001, 0, 1)));
    const d = estimateReferenceInterval(x, { outliers: "none" });
    expect(d.parametric.transform).not.toBe("none");
    expect(d.normality.shapiroWilk).toBeNull();
    expect(d.normality.andersonDarling).not.toBeNull();
    const chosen = d.parametric.transform === "ln" ? x.map(Math.log) : x.map((v) => (v ** d.parametric.lambda! - 1) / d.parametric.lambda!);
    expect(Math.abs(skewness(chosen))).toBeLessThan(Math.abs(skewness(x)));
    expect(Math.abs(skewness(chosen))).toBeLessThan(0.1);
  });

  it("rejects bad input and options", () => {
    expect(() => estimateReferenceInterval([])).toThrow(StatsInputError);
    expect(() => estimateReferenceInterval([1, Number.NaN])).toThrow(/finite/);
    expect(() => estimateReferenceInterval([1, 2, 3], { outliers: "grubbs" as never })).toThrow(/outliers must be/);
    expect(() => estimateReferenceInterval([-1, 2, 3], { transform: "ln" })).toThrow(/positive/);
    expect(() => estimateReferenceInterval([1, 2, 3], { seed: 0.5 })).toThrow(/seed/);
    expect(() => estimateReferenceInterval([1, 2, 3], { screening: "drop" as never })).toThrow(
      'screening must be one of propose, apply (got "drop")',
    );
  });
});
