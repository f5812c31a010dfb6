import { describe, expect, it } from "vitest";
import { referenceCurve, shadedBelow, unitTicks } from "@/lib/scoring/reference-curve";

describe("the reference distribution the score page draws", () => {
  it("draws a gaussian on its own scale: limits at g(limit), the value at mean + z·sd", () => {
    // ln scale: R `log(10)` = 2.302585, `log(40)` = 3.688879.
    const model = { kind: "gaussian" as const, transform: "ln" as const, lambda: null, mean: 3, sd: 0.35 };
    const curve = referenceCurve(model, { low: 10, high: 40, z: 1.5 })!;
    expect(curve.axis).toBe("ln");
    expect(curve.lower).toBeCloseTo(2.302585, 6);
    expect(curve.upper).toBeCloseTo(3.688879, 6);
    // 3 + 1.5 × 0.35 = 3.525 (arithmetic).
    expect(curve.value).toBeCloseTo(3.525, 12);
    expect(curve.clamped).toBe(false);
    // The density's peak is 1/(sd·√(2π)): R `dnorm(3, 3, 0.35)` = 1.139835.
    expect(Math.max(...curve.points.map((p) => p.y))).toBeCloseTo(1.139835, 5);
    // At least mean ± 4 sd is drawn.
    expect(curve.min).toBeLessThanOrEqual(3 - 4 * 0.35);
    expect(curve.max).toBeGreaterThanOrEqual(3 + 4 * 0.35);
  });

  it("puts Box-Cox limits at (x^λ − 1)/λ", () => {
    // (9^0.5 − 1)/0.5 = 4 and (25^0.5 − 1)/0.5 = 8 (arithmetic).
    const model = { kind: "gaussian" as const, transform: "box-cox" as const, lambda: 0.5, mean: 6, sd: 1 };
    const curve = referenceCurve(model, { low: 9, high: 25, z: -2 })!;
    expect(curve.axis).toBe("box-cox");
    expect(curve.lambda).toBe(0.5);
    expect(curve.lower).toBeCloseTo(4, 12);
    expect(curve.upper).toBeCloseTo(8, 12);
    expect(curve.value).toBeCloseTo(4, 12);
  });

  it("draws empirical and zlog models as the standard normal in z, the limits at the 2.5th and 97.5th percentiles", () => {
    // R `qnorm(0.975)` = 1.959964; zlog maps the limits to ±1.96 by its definition (Hoffmann 2017).
    const empirical = referenceCurve({ kind: "empirical", n: 240 }, { low: 3.5, high: 5.1, z: 0.4 })!;
    expect(empirical.axis).toBe("z");
    expect(empirical.lower).toBeCloseTo(-1.959964, 6);
    expect(empirical.upper).toBeCloseTo(1.959964, 6);
    expect(empirical.value).toBe(0.4);
    // R `dnorm(0)` = 0.3989423.
    expect(Math.max(...empirical.points.map((p) => p.y))).toBeCloseTo(0.3989423, 6);
    const zlog = referenceCurve({ kind: "zlog", scale: "log" }, { low: 35, high: 52, z: -2.247 })!;
    expect([zlog.lower, zlog.upper]).toEqual([-1.96, 1.96]);
  });

  it("pins a value far out to the edge and says so; draws nothing for a limits-only interval", () => {
    const curve = referenceCurve({ kind: "empirical", n: 120 }, { low: 1, high: 2, z: 9.3 })!;
    expect(curve.value).toBe(6);
    expect(curve.clamped).toBe(true);
    expect(referenceCurve({ kind: "limits" }, { low: null, high: 5, z: null })).toBeNull();
    const noValue = referenceCurve({ kind: "empirical", n: 120 }, { low: 1, high: 2, z: null })!;
    expect(noValue.value).toBeNull();
    expect(shadedBelow(noValue)).toEqual([]);
  });

  it("shades the area up to the value and ends exactly there", () => {
    const curve = referenceCurve({ kind: "empirical", n: 120 }, { low: 1, high: 2, z: 0.123 })!;
    const shade = shadedBelow(curve);
    expect(shade[0].x).toBe(curve.min);
    expect(shade.at(-1)!.x).toBeCloseTo(0.123, 12);
    expect(shade.every((p) => p.x <= 0.123 + 1e-12)).toBe(true);
  });

  it("labels a log axis in the unit with round values placed at their logarithm", () => {
    const model = { kind: "gaussian" as const, transform: "ln" as const, lambda: null, mean: 3, sd: 0.35 };
    const ticks = unitTicks(model, 1.6, 4.4, 6);
    expect(ticks.length).toBeGreaterThanOrEqual(4);
    for (const t of ticks) {
      expect(t.at).toBeCloseTo(Math.log(t.value), 12);
      // Two significant digits (common practice for axis labels).
      expect(Number(t.value.toPrecision(2))).toBe(t.value);
    }
    // e^1.6 = 4.95 → 5.0 (R `exp(1.6)` = 4.953032), e^4.4 = 81.45 → 81 (R `exp(4.4)` = 81.4509).
    expect(ticks[0].value).toBe(5);
    expect(ticks.at(-1)!.value).toBe(81);
  });
});
