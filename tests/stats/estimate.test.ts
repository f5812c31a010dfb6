import { describe, expect, it } from "vitest";
import { estimateReferenceInterval } from "@/lib/stats/estimate";
import { parametricLimits } from "@/lib/stats/parametric";
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
    const d = estimateReferenceInterval([1, 1.1, 1.2, 100]);
    expect(d.excluded).toEqual([{ value: 100, reason: "horn" }]);
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
    const d = estimateReferenceInterval(set("lognormal-80").values);
    expect(Object.keys(d)).toEqual([
      "n", "excluded", "nonparametric", "parametric", "robust", "normality", "recommended", "warnings",
    ]);
    expect(Object.keys(d.nonparametric)).toEqual(["lower", "upper", "lowerCi", "upperCi"]);
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

  it("excludes what the screen proposes and labels the reason", () => {
    const x = [...set("gaussian-120").values, 46];
    const d = estimateReferenceInterval(x, { outliers: "horn" });
    expect(d.excluded).toContainEqual({ value: 46, reason: "horn" });
    expect(d.n).toBe(x.length - d.excluded.length);
    const none = estimateReferenceInterval(x, { outliers: "none" });
    expect(none.excluded).toEqual([]);
    expect(none.n).toBe(x.length);
    expect(estimateReferenceInterval(x, { outliers: "dixon" }).excluded).toContainEqual({ value: 46, reason: "dixon" });
    expect(estimateReferenceInterval(x, { outliers: "tukey" }).excluded).toContainEqual({ value: 46, reason: "tukey" });
  });

  it("falls back to Tukey on the raw scale when Horn meets a non-positive value", () => {
    const x = set("gaussian-60").values.map((v) => v - 140);
    const d = estimateReferenceInterval(x);
    expect(d.warnings.join(" ")).toMatch(/Tukey fences on the raw scale/);
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

  it("matches a plain parametric computation for transform none", () => {
    const x = set("gaussian-60").values;
    const d = estimateReferenceInterval(x, { outliers: "none", transform: "none" });
    const p = parametricLimits(x);
    expect(d.parametric.lower).toBeCloseTo(p.lower!, 12);
    expect(d.parametric.upperCi![1]).toBeCloseTo(p.upperCi![1], 12);
  });

  it("rejects bad input and options", () => {
    expect(() => estimateReferenceInterval([])).toThrow(StatsInputError);
    expect(() => estimateReferenceInterval([1, Number.NaN])).toThrow(/finite/);
    expect(() => estimateReferenceInterval([1, 2, 3], { outliers: "grubbs" as never })).toThrow(/outliers must be/);
    expect(() => estimateReferenceInterval([-1, 2, 3], { transform: "ln" })).toThrow(/positive/);
    expect(() => estimateReferenceInterval([1, 2, 3], { seed: 0.5 })).toThrow(/seed/);
  });
});
