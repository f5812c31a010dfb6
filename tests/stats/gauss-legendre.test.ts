import { describe, expect, it } from "vitest";
import { gaussLegendreRule, integrateGaussLegendre } from "@/lib/stats/gauss-legendre";
import { StatsInputError } from "@/lib/stats/validate";

describe("gaussLegendreRule", () => {
  it("gives the published 5-point nodes and weights", () => {
    // Abramowitz & Stegun, Handbook of Mathematical Functions, Table 25.4 (n = 5), 15 digits
    // printed; 1e-14 allows for the last printed digit.
    const r = gaussLegendreRule(5);
    const nodes = [-0.906179845938664, -0.538469310105683, 0, 0.538469310105683, 0.906179845938664];
    const weights = [0.236926885056189, 0.478628670499366, 0.568888888888889, 0.478628670499366, 0.236926885056189];
    for (let i = 0; i < 5; i++) {
      expect(Math.abs(r.nodes[i] - nodes[i])).toBeLessThan(1e-14);
      expect(Math.abs(r.weights[i] - weights[i])).toBeLessThan(1e-14);
    }
  });

  it("integrates polynomials of degree 2m − 1 exactly", () => {
    // ∫_{-1}^{1} x^k dx = 2/(k + 1) for even k, 0 for odd k (common practice). A 10-point
    // rule is exact to degree 19; 1e-14 is rounding in a sum of 10 terms.
    const r = gaussLegendreRule(10);
    for (const k of [0, 1, 6, 18, 19]) {
      let s = 0;
      for (let i = 0; i < 10; i++) s += r.weights[i] * r.nodes[i] ** k;
      expect(Math.abs(s - (k % 2 === 0 ? 2 / (k + 1) : 0)), `x^${k}`).toBeLessThan(1e-14);
    }
  });

  it("rejects a rule size that is not a positive integer", () => {
    expect(() => gaussLegendreRule(0)).toThrow(StatsInputError);
    expect(() => gaussLegendreRule(2.5)).toThrow(/number of points must be an integer from 1 to 100/);
  });
});

describe("integrateGaussLegendre", () => {
  it("integrates smooth functions over panels", () => {
    // ∫_0^π sin x dx = 2; ∫_0^1 e^x dx = e − 1 (common practice). Four 10-point panels are
    // exact to rounding for these.
    const r = gaussLegendreRule(10);
    expect(Math.abs(integrateGaussLegendre(Math.sin, [0, Math.PI / 4, Math.PI / 2, Math.PI], r) - 2)).toBeLessThan(1e-14);
    expect(Math.abs(integrateGaussLegendre(Math.exp, [0, 0.5, 1], r) - (Math.E - 1))).toBeLessThan(1e-14);
  });

  it("rejects breakpoints that are not increasing", () => {
    const r = gaussLegendreRule(4);
    expect(() => integrateGaussLegendre(Math.exp, [0], r)).toThrow(/at least two breakpoints/);
    expect(() => integrateGaussLegendre(Math.exp, [0, 1, 0.5], r)).toThrow(/increasing/);
  });
});
