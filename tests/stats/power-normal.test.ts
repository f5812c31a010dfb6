import { describe, expect, it } from "vitest";
import { powerNormalCdf, powerNormalQuantile, powerNormalScale, rescalePowerNormal } from "@/lib/stats/power-normal";
import { StatsInputError } from "@/lib/stats/validate";

describe("power-normal distribution", () => {
  it("gives the quantiles R gives", () => {
    // R (scripts/fixtures/indirect-mixtures.R, sqrt-10k-30): mu <- (80^0.5 - 1)/0.5;
    // (1 + 0.5*(mu + qnorm(c(.025, .975))*1.1))^(1/0.5) = 61.878545400575184, 100.44553718594479.
    const d = { lambda: 0.5, mu: (Math.sqrt(80) - 1) / 0.5, sigma: 1.1 };
    expect(powerNormalQuantile(0.025, d)).toBeCloseTo(61.878545400575184, 9);
    expect(powerNormalQuantile(0.975, d)).toBeCloseTo(100.44553718594479, 9);
    // R: exp(log(25) + qnorm(0.975)*0.3) = 45.009114793675884 (lognormal-100k-20).
    expect(powerNormalQuantile(0.975, { lambda: 0, mu: Math.log(25), sigma: 0.3 })).toBeCloseTo(45.009114793675884, 9);
  });

  it("inverts its quantile with its distribution function", () => {
    const d = { lambda: -0.4, mu: 1.2, sigma: 0.05 };
    for (const p of [0.01, 0.3, 0.9]) expect(powerNormalCdf(powerNormalQuantile(p, d) as number, d)).toBeCloseTo(p, 12);
  });

  it("has no quantile where no positive value maps", () => {
    // λ = 1: y = x − 1 ≥ −1; with μ = 0, σ = 1 the 2.5th percentile −1.96 has no positive x.
    expect(powerNormalQuantile(0.025, { lambda: 1, mu: 0, sigma: 1 })).toBeNull();
  });

  it("maps 0 and ∞ to the ends of the transformed scale", () => {
    expect(powerNormalScale(0, 0.5)).toBe(-2);
    expect(powerNormalScale(0, 0)).toBe(Number.NEGATIVE_INFINITY);
    expect(powerNormalScale(Number.POSITIVE_INFINITY, -0.5)).toBe(2);
    expect(powerNormalScale(Number.POSITIVE_INFINITY, 0.5)).toBe(Number.POSITIVE_INFINITY);
    expect(powerNormalCdf(0, { lambda: 0, mu: 0, sigma: 1 })).toBe(0);
  });

  it("rescales: c·X has λ unchanged, μ′ = c^λ·μ + g(c), σ′ = c^λ·σ", () => {
    const a = rescalePowerNormal({ lambda: 1, mu: 0, sigma: 0.1 }, 100);
    expect([a.lambda, a.mu, a.sigma]).toEqual([1, expect.closeTo(99, 12), expect.closeTo(10, 12)]);
    const b = rescalePowerNormal({ lambda: 0, mu: 0.2, sigma: 0.3 }, Math.E);
    expect([b.lambda, b.mu, b.sigma]).toEqual([0, expect.closeTo(1.2, 12), 0.3]);
    const d = { lambda: 0.3, mu: 0.05, sigma: 0.1 };
    const c = 7.5;
    const q = powerNormalQuantile(0.9, d) as number;
    expect(powerNormalQuantile(0.9, rescalePowerNormal(d, c))).toBeCloseTo(c * q, 10);
  });

  it("refuses bad parameters", () => {
    expect(() => powerNormalQuantile(0.5, { lambda: 0, mu: 0, sigma: 0 })).toThrow(StatsInputError);
    expect(() => powerNormalQuantile(1, { lambda: 0, mu: 0, sigma: 1 })).toThrow(/strictly between 0 and 1/);
    expect(() => powerNormalCdf(-1, { lambda: 0, mu: 0, sigma: 1 })).toThrow(/≥ 0/);
    expect(() => rescalePowerNormal({ lambda: 0, mu: 0, sigma: 1 }, 0)).toThrow(/positive/);
  });
});
