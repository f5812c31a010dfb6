import { describe, expect, it } from "vitest";
import { zlog, zlogInverse } from "@/lib/scoring/zlog";
import { StatsInputError } from "@/lib/stats/validate";

describe("zlog (Hoffmann et al. 2017)", () => {
  // Albumin 35–52 g/L, computed with R (METHODS.md §10.1). zlog printed to 4 decimals
  // (tolerance 5e-5), percentiles to 2 (5e-3) or as shown.
  const table: [number, number, number][] = [
    [42, -0.1547, 43.85],
    [34, -2.247, 1.23],
    [38, -1.1457, 12.6],
    [43, 0.0783, 53.12],
    [50, 1.5717, 94.2],
    [31, -3.1617, 0.08],
  ];
  for (const [x, z, pct] of table) {
    it(`albumin ${x} g/L → zlog ${z}, ${pct}th percentile`, () => {
      const r = zlog(x, 35, 52);
      expect(Math.abs(r.z - z)).toBeLessThan(5e-5);
      expect(Math.abs(r.percentile - pct)).toBeLessThan(5e-3);
    });
  }
  it("far tails: 27 → −4.5296 (0.0003rd percentile), 24 → −5.6958 (~0)", () => {
    expect(Math.abs(zlog(27, 35, 52).z + 4.5296)).toBeLessThan(5e-5);
    expect(Math.abs(zlog(27, 35, 52).percentile - 0.0003)).toBeLessThan(5e-5);
    expect(Math.abs(zlog(24, 35, 52).z + 5.6958)).toBeLessThan(5e-5);
    expect(zlog(24, 35, 52).percentile).toBeLessThan(1e-5);
  });
  it("maps the limits to ∓1.96 and inverts exactly", () => {
    // By construction (Hoffmann 2017): the interval maps to −1.96 … +1.96.
    expect(zlog(35, 35, 52).z).toBeCloseTo(-1.96, 12);
    expect(zlog(52, 35, 52).z).toBeCloseTo(1.96, 12);
    expect(zlogInverse(-1.96, 35, 52)).toBeCloseTo(35, 10);
    expect(zlogInverse(zlog(34, 35, 52).z, 35, 52)).toBeCloseTo(34, 10);
    expect(zlogInverse(0, 35, 52)).toBeCloseTo(Math.sqrt(35 * 52), 10); // geometric mean
  });
  it("offers the linear variant and the exact 2·Φ⁻¹(0.975) width", () => {
    expect(zlog(43.5, 35, 52, { scale: "linear" }).z).toBeCloseTo(0, 12);
    expect(zlog(52, 35, 52, { scale: "linear" }).z).toBeCloseTo(1.96, 12);
    // 2·qnorm(0.975) = 3.919927969 (R); the high limit maps to 1.959964.
    expect(zlog(52, 35, 52, { width: "exact" }).z).toBeCloseTo(1.959963985, 8);
    expect(zlogInverse(1.96, -5, 5, { scale: "linear" })).toBeCloseTo(5, 12);
  });
  it("rejects values and limits it cannot take", () => {
    expect(() => zlog(0, 35, 52)).toThrow("value = 0 is not positive; zlog needs values > 0");
    expect(() => zlog(40, 52, 35)).toThrow("the low limit (52) must be below the high limit (35)");
    expect(() => zlog(1, 0, 5)).toThrow("zlog needs a positive low limit (got 0); use the linear scale");
    expect(() => zlog(NaN, 35, 52)).toThrow(StatsInputError);
  });
});
