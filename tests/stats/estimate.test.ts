import { describe, expect, it } from "vitest";
import normal from "@stdlib/stats-base-dists-normal";
import { skewness } from "@/lib/stats/descriptive";
import { estimateReferenceInterval } from "@/lib/stats/estimate";
import { createRandom } from "@/lib/stats/random";
import { parametricLimits } from "@/lib/stats/parametric";
import { shapiroWilk } from "@/lib/stats/shapiro-wilk";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

const set = (name: string) => fixture.sets.find((s) => s.name === name)!;

describe("estimateReferenceInterval", () => {
  it("has exactly the document shape of the estimate contract", () => {
    const d = estimateReferenceInterval(set("lognormal-80").values);
    expect(Object.keys(d)).toEqual([
      "n", "excluded", "nonparametric", "parametric", "robust", "normality", "recommended", "warnings",
    ]);
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
  });
});
