import { describe, expect, it } from "vitest";
import normal from "@stdlib/stats-base-dists-normal";
import { scoreGaussian } from "@/lib/scoring/gaussian";
import { StatsInputError } from "@/lib/stats/validate";
import fx from "../fixtures/scoring-checks.json";

describe("scoreGaussian", () => {
  it("raw scale: z = (x − mean)/sd, percentile = 100·Φ(z)", () => {
    const r = scoreGaussian({ kind: "gaussian", transform: "none", mean: 4.3, sd: 0.4 }, 5.1);
    // R: 100 * pnorm(2) = 97.72498680518208 (scripts/fixtures/scoring-checks.R); 1e-10 for Φ differences.
    expect(r.z).toBeCloseTo(2, 12);
    expect(r.percentile).toBeCloseTo(fx.normal.percentile, 10);
  });

  it("Box-Cox: reproduces METHODS.md §2.2 (x = 12 → z = 1.4270, 92.3rd percentile)", () => {
    const model = { kind: "gaussian" as const, transform: "box-cox" as const, lambda: fx.boxCox.lambda, mean: fx.boxCox.mean, sd: fx.boxCox.sd };
    const r = scoreGaussian(model, 12);
    // R (scripts/fixtures/scoring-checks.R): z = 1.426965547123339, percentile 92.32050871855174.
    expect(r.z).toBeCloseTo(fx.boxCox.z, 10);
    expect(r.percentile).toBeCloseTo(fx.boxCox.percentile, 8);
    expect(r.z).toBeCloseTo(1.427, 3); // METHODS.md §2.2, printed to 4 decimals
  });

  it("ln: z on the log scale", () => {
    const r = scoreGaussian({ kind: "gaussian", transform: "ln", mean: fx.ln.mean, sd: fx.ln.sd }, 12);
    // R: (log(12) - mean(log(y))) / sd(log(y)) = 1.513464793838612
    expect(r.z).toBeCloseTo(fx.ln.z, 10);
    expect(r.percentile).toBeCloseTo(fx.ln.percentile, 8);
    expect(r.percentile).toBe(100 * normal.cdf(r.z, 0, 1)); // @stdlib Φ, as everywhere
  });

  it("Box-Cox with λ = 0 is the ln model", () => {
    // Box & Cox 1964: λ = 0 means ln. R value as in the ln test: z = 1.513464793838612.
    const bc = scoreGaussian({ kind: "gaussian", transform: "box-cox", lambda: 0, mean: fx.ln.mean, sd: fx.ln.sd }, 12);
    expect(bc.z).toBeCloseTo(fx.ln.z, 10);
    expect(bc.percentile).toBeCloseTo(fx.ln.percentile, 8);
  });

  it("gives a clear per-value error for values ≤ 0 under ln or Box-Cox", () => {
    const ln = { kind: "gaussian" as const, transform: "ln" as const, mean: 1, sd: 0.5 };
    expect(() => scoreGaussian(ln, 0)).toThrow(StatsInputError);
    expect(() => scoreGaussian(ln, 0)).toThrow("value 0 is not positive; a log scoring model needs values > 0");
    expect(() => scoreGaussian({ ...ln, transform: "box-cox", lambda: 0.5 }, -2)).toThrow(
      "value -2 is not positive; a Box-Cox scoring model needs values > 0",
    );
    expect(() => scoreGaussian(ln, NaN)).toThrow("value must be a finite number (got NaN)");
    // Raw scale takes any finite value.
    expect(scoreGaussian({ ...ln, transform: "none" }, -1).z).toBeCloseTo(-4, 12);
  });
});
