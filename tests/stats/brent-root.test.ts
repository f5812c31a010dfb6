import { describe, expect, it } from "vitest";
import { brentRoot } from "@/lib/stats/brent-root";
import { StatsInputError } from "@/lib/stats/validate";

describe("brentRoot", () => {
  it("finds roots to the requested tolerance", () => {
    // √2 = 1.4142135623730951 (common practice); tol 1e-14 asked, so 1e-13 is a safe check.
    const r = brentRoot((x) => x * x - 2, 0, 2, 1e-14);
    expect(Math.abs(r.x - 1.4142135623730951)).toBeLessThan(1e-13);
    // The fixed point of cos, 0.7390851332151607 (from memory; R: uniroot(function(x) cos(x) - x,
    // c(0, 1), tol = 1e-15)$root prints 0.7390851).
    expect(Math.abs(brentRoot((x) => Math.cos(x) - x, 0, 1, 1e-14).x - 0.7390851332151607)).toBeLessThan(1e-13);
    // A bracket given in either order.
    expect(Math.abs(brentRoot((x) => x * x - 2, 2, 0, 1e-14).x - 1.4142135623730951)).toBeLessThan(1e-13);
  });

  it("converges superlinearly on a smooth function", () => {
    // Bisection alone would need about 50 steps for 1e-14 on [0, 2]; Brent's interpolation
    // steps need far fewer (common practice: about 10 for a simple root).
    expect(brentRoot((x) => x * x * x - 2 * x - 5, 2, 3, 1e-14).evaluations).toBeLessThan(20);
  });

  it("returns an end of the bracket that is itself a root", () => {
    expect(brentRoot((x) => x - 1, 1, 3).x).toBe(1);
    expect(brentRoot((x) => x - 3, 1, 3).x).toBe(3);
  });

  it("rejects an interval that does not bracket a root", () => {
    expect(() => brentRoot((x) => x * x + 1, -1, 1)).toThrow(StatsInputError);
    expect(() => brentRoot((x) => x * x + 1, -1, 1)).toThrow(/does not bracket a root/);
    expect(() => brentRoot((x) => x, Number.NaN, 1)).toThrow(/a must be a finite number/);
    expect(() => brentRoot((x) => x, 1, 1)).toThrow(/two different ends/);
    expect(() => brentRoot((x) => x, -1, 1, 0)).toThrow(/tol must be positive/);
  });
});
