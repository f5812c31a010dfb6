import { describe, expect, it } from "vitest";
import { estimateReferenceInterval } from "@/lib/stats/estimate";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";
import scaleFixture from "../fixtures/scale-choice.json";

const set = (name: string) => fixture.sets.find((s) => s.name === name)!;

describe("the automatic scale (R: scripts/fixtures/scale-choice.R)", () => {
  // Each set: R's likelihood-ratio tests of λ = 1 and λ = 0 against λ̂ decide the scale
  // (raw, then ln, then Box-Cox; DESIGN.md), shapiro.test judges normality on it, and the
  // limits carry exact 90% CIs (METHODS.md §2.3). Tolerances: statistics 1e-9 relative to
  // max(1, statistic) as in tests/stats/box-cox-lrt.test.ts; limits 1e-6 relative as in
  // tests/stats/parametric.test.ts; W 1e-9 and its p 1e-8 (this Shapiro-Wilk matches R's
  // to 1e-10 on the same values, tests/stats/shapiro-wilk.test.ts, and the Box-Cox values
  // differ from R's by λ̂'s last digits).
  const close = (a: number | null, b: number | null, tol: number, label: string) => {
    expect(a, label).not.toBeNull();
    expect(Math.abs(a! / b! - 1), `${label}: ${a} vs ${b}`).toBeLessThan(tol);
  };
  it.each(scaleFixture.sets.map((s) => [s.name, s.transform, s] as const))("%s → %s", (_, transform, s) => {
    const d = estimateReferenceInterval(s.values, { outliers: "none" });
    const p = d.parametric;
    expect(d.n).toBe(s.values.length);
    expect(p.transform).toBe(transform);
    if (transform === "box-cox") expect(Math.abs(p.lambda! - s.lambdaHat)).toBeLessThan(1e-6);
    else expect(p.lambda).toBeNull();
    const c = p.scaleChoice!;
    expect(Math.abs(c.lrtAgainstRaw.statistic - s.lrtAgainstRaw.statistic)).toBeLessThan(1e-9 * Math.max(1, s.lrtAgainstRaw.statistic));
    expect(Math.abs(c.lrtAgainstLn.statistic - s.lrtAgainstLn.statistic)).toBeLessThan(1e-9 * Math.max(1, s.lrtAgainstLn.statistic));
    close(c.lrtAgainstRaw.p, s.lrtAgainstRaw.p, 1e-9 * Math.max(1, s.lrtAgainstRaw.statistic), "p vs raw");
    close(c.lrtAgainstLn.p, s.lrtAgainstLn.p, 1e-9 * Math.max(1, s.lrtAgainstLn.statistic), "p vs ln");
    close(p.lower, s.lower, 1e-6, "lower");
    close(p.upper, s.upper, 1e-6, "upper");
    close(p.lowerCi![0], s.lowerCi[0], 1e-6, "lowerCi[0]");
    close(p.lowerCi![1], s.lowerCi[1], 1e-6, "lowerCi[1]");
    close(p.upperCi![0], s.upperCi[0], 1e-6, "upperCi[0]");
    close(p.upperCi![1], s.upperCi[1], 1e-6, "upperCi[1]");
    if (s.shapiroWilk === null) {
      // above 5000 values Shapiro-Wilk (Royston) is undefined; Anderson-Darling stands alone
      expect(d.normality.shapiroWilk).toBeNull();
    } else {
      expect(Math.abs(d.normality.shapiroWilk!.w - s.shapiroWilk.w)).toBeLessThan(1e-9);
      expect(Math.abs(d.normality.shapiroWilk!.p - s.shapiroWilk.p)).toBeLessThan(1e-8);
    }
    expect(d.normality.andersonDarling).not.toBeNull();
  });

  it("warns when λ̂ reaches the edge of [−3, 3] and still keeps the raw scale", () => {
    // R (scale-choice.R, "gaussian-60-edge"): λ̂ = 3, 2·(ℓ(3) − ℓ(1)) = 0.314 < 3.841 → raw.
    const s = scaleFixture.sets.find((x) => x.name === "gaussian-60-edge")!;
    const d = estimateReferenceInterval(s.values, { outliers: "none" });
    expect(d.parametric.transform).toBe("none");
    expect(d.parametric.scaleChoice!.lambdaHat).toBe(3);
    expect(d.warnings).toContain(
      "The Box-Cox λ reached the edge of its search range (3); the likelihood-ratio tests of the scale used that edge value.",
    );
  });

  it("tests the scale on the values Horn's screen kept, even when it stops with 3", () => {
    // Horn's screen drops 100 from [1, 1.1, 1.2, 100] and stops, its last λ fitted with 100
    // still in. R on the 3 kept values, ll(l) = -3/2*log(mean((y - mean(y))^2)) + (l - 1)*sum(log(x)):
    // optimize(ll, c(-3, 3), maximum = TRUE, tol = 1e-12) → λ̂ = 0.5993438154;
    // 2*(ll(λ̂) - ll(1)) = 0.001665480068, 2*(ll(λ̂) - ll(0)) = 0.003727414589. With 3 values ℓ
    // is very flat (hence 1e-5 on λ̂); the statistics agree to 1e-10.
    const d = estimateReferenceInterval([1, 1.1, 1.2, 100], { screening: "apply" });
    expect(d.excluded.map((e) => ({ value: e.value, reason: e.reason }))).toEqual([{ value: 100, reason: "horn" }]);
    const c = d.parametric.scaleChoice!;
    expect(Math.abs(c.lambdaHat - 0.5993438154)).toBeLessThan(1e-5);
    expect(c.lrtAgainstRaw.statistic).toBeCloseTo(0.001665480068, 10);
    expect(c.lrtAgainstLn.statistic).toBeCloseTo(0.003727414589, 10);
    expect(d.parametric.transform).toBe("none");
  });

  it("records no test when the scale was given", () => {
    const s = scaleFixture.sets.find((x) => x.name === "gamma-250")!;
    expect(estimateReferenceInterval(s.values, { outliers: "none", transform: "ln" }).parametric.scaleChoice).toBeNull();
  });
});

describe("estimateReferenceInterval", () => {
  it("has exactly the document shape of the estimate contract", () => {
    // DESIGN.md: the contract's fields (n … warnings) stay; proposed, screening, provenance and
    // censored were added after them.
    const d = estimateReferenceInterval(set("lognormal-80").values);
    expect(Object.keys(d)).toEqual([
      "n", "excluded", "nonparametric", "parametric", "robust", "normality", "recommended", "warnings",
      "proposed", "screening", "provenance", "censored",
    ]);
    expect(d.censored).toEqual({ below: 0, above: 0, fraction: 0 });
    expect(Object.keys(d.screening)).toEqual(["outliers", "rule", "mode", "applied", "valuesGiven"]);
    expect(Object.keys(d.provenance)).toEqual(["options", "bootstrap", "robust", "engine"]);
    expect(Object.keys(d.nonparametric)).toEqual([
      "lower", "upper", "lowerCi", "upperCi", "lowerCensored", "upperCensored", "lowerCiCensored", "upperCiCensored",
    ]);
    expect(Object.keys(d.parametric)).toEqual([
      "transform", "lambda", "mean", "sd", "lower", "upper", "lowerCi", "upperCi", "scaleChoice",
    ]);
    expect(Object.keys(d.parametric.scaleChoice!)).toEqual(["lambdaHat", "lrtAgainstRaw", "lrtAgainstLn"]);
    expect(Object.keys(d.parametric.scaleChoice!.lrtAgainstRaw)).toEqual(["statistic", "p"]);
    expect(Object.keys(d.robust)).toEqual(["lower", "upper", "lowerCi", "upperCi"]);
    expect(Object.keys(d.normality)).toEqual(["shapiroWilk", "andersonDarling"]);
    expect(Object.keys(d.normality.andersonDarling!)).toEqual(["a2", "p"]);
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

  it("keeps data with a non-positive value on the raw scale and says so", () => {
    const x = set("gaussian-60").values.map((v) => v - 140);
    const d = estimateReferenceInterval(x, { outliers: "none" });
    expect(d.parametric.transform).toBe("none");
    expect(d.parametric.scaleChoice).toBeNull();
    expect(d.warnings).toContain(
      "Some values are not positive, so the parametric scale stays raw: ln and Box-Cox need positive values.",
    );
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
