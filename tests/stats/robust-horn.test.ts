import { describe, expect, it } from "vitest";
import {
  C_LOCATION,
  C_SCALE,
  robustLimitsOnScale,
  robustPointLimits,
  robustReferenceLimits,
} from "@/lib/stats/robust-horn";
import { parametricLimits } from "@/lib/stats/parametric";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

const G60 = fixture.sets.find((s) => s.name === "gaussian-60")!.values;
// R: rnorm(1000, 100, 15) in scripts/fixtures/reference-limits.R; the first 100 values
const G100 = fixture.sets.find((s) => s.name === "gaussian-1000")!.values.slice(0, 100);

describe("robustLimitsOnScale (the estimator without CIs)", () => {
  it("matches the same formulas evaluated in R", () => {
    // R (scripts/fixtures-style calculator, on the gaussian-60 set):
    //   M <- median(x); mad <- median(abs(x-M))/0.6745; T iterated with c = 3.7 to 1e-12;
    //   bv(C,c) = n·Σ(x-C)²(1-u²)⁴/(D(D-1)); s = sqrt(bv(M,9*0.6745)); sT = sqrt(bv(T,3.7)/n);
    //   T ± qt(.975,n-1)·sqrt(s²+sT²) → 135.111648891108, 144.522340533351
    // This checks the arithmetic, not the constants (see lib/stats/robust-horn.ts).
    // 1e-6: T stops at |ΔT| < 1e-7·MAD here against 1e-12 in R.
    const r = robustLimitsOnScale(G60)!;
    expect(C_LOCATION).toBe(3.7);
    expect(C_SCALE).toBeCloseTo(9 * 0.6745, 12);
    expect(r.location).toBeCloseTo(139.81699471223, 6);
    expect(r.scale).toBeCloseTo(2.330328548711, 6);
    expect(r.locationSe).toBeCloseTo(0.314854414327, 6);
    expect(r.lower).toBeCloseTo(135.111648891108, 6);
    expect(r.upper).toBeCloseTo(144.522340533351, 6);
  });

  it("gives the same R-computed limits through the point-only entry point and the one with CIs", () => {
    // R values as above (135.111648891108, 144.522340533351); 1e-6 for the same reason.
    const point = robustPointLimits(G60);
    expect(point.lower).toBeCloseTo(135.111648891108, 6);
    expect(point.upper).toBeCloseTo(144.522340533351, 6);
    const withCi = robustReferenceLimits(G60, { replicates: 100 });
    expect(withCi.lower).toBeCloseTo(135.111648891108, 6);
    expect(withCi.upper).toBeCloseTo(144.522340533351, 6);
    expect(() => robustPointLimits(G60.slice(0, 19))).toThrow(
      "the robust method is defined for 20 to 119 values (got 19)",
    );
    expect(() => robustPointLimits(G60, { transform: "box-cox" })).toThrow("the robust method on the Box-Cox scale needs λ");
  });

  it("is not estimable when more than half the values are equal (MAD = 0)", () => {
    expect(robustLimitsOnScale([5, 5, 5, 5, 5, 6, 7])).toBeNull();
  });
});

describe("robustReferenceLimits", () => {
  it("agrees with the parametric limits within their CIs on clean Gaussian data (n = 100)", () => {
    const p = parametricLimits(G100);
    const r = robustReferenceLimits(G100, { seed: 1 });
    expect(r.lower!).toBeGreaterThanOrEqual(p.lowerCi![0]);
    expect(r.lower!).toBeLessThanOrEqual(p.lowerCi![1]);
    expect(r.upper!).toBeGreaterThanOrEqual(p.upperCi![0]);
    expect(r.upper!).toBeLessThanOrEqual(p.upperCi![1]);
    // the bootstrap CIs bracket their limits here (common practice, not a theorem)
    expect(r.lowerCi![0]).toBeLessThan(r.lower!);
    expect(r.lowerCi![1]).toBeGreaterThan(r.lower!);
    expect(r.upperCi![0]).toBeLessThan(r.upper!);
    expect(r.upperCi![1]).toBeGreaterThan(r.upper!);
  });

  it("moves far less than mean ± 1.96 SD under one gross error", () => {
    // A tenfold keying error (the value 1000 instead of ~100) on the 100 clean values.
    const clean = robustLimitsOnScale(G100)!;
    const dirty = robustLimitsOnScale([...G100.slice(0, 99), 1000])!;
    const pClean = parametricLimits(G100);
    const pDirty = parametricLimits([...G100.slice(0, 99), 1000]);
    const robustShift = Math.abs(dirty.upper - clean.upper) + Math.abs(dirty.lower - clean.lower);
    const gaussShift =
      Math.abs(pDirty.upper! - pClean.upper!) + Math.abs(pDirty.lower! - pClean.lower!);
    // "far less": under a tenth of the shift of the classical limits
    expect(robustShift).toBeLessThan(0.1 * gaussShift);
  });

  it("would not resist that error with c = 205.6 for the scale (why we did not adopt it)", () => {
    const clean = robustLimitsOnScale(G100, { cScale: 205.6 })!;
    const dirty = robustLimitsOnScale([...G100.slice(0, 99), 1000], { cScale: 205.6 })!;
    const pClean = parametricLimits(G100);
    const pDirty = parametricLimits([...G100.slice(0, 99), 1000]);
    const robustShift = Math.abs(dirty.upper - clean.upper) + Math.abs(dirty.lower - clean.lower);
    const gaussShift =
      Math.abs(pDirty.upper! - pClean.upper!) + Math.abs(pDirty.lower! - pClean.lower!);
    expect(robustShift).toBeGreaterThan(0.5 * gaussShift);
  });

  it("runs on a transformed scale and carries the limits back", () => {
    const x = fixture.sets.find((s) => s.name === "lognormal-80")!.values;
    const r = robustReferenceLimits(x, { transform: "ln", seed: 2, replicates: 200 });
    const p = parametricLimits(x, { transform: "ln" });
    // same scale, both near the Gaussian limits; 5% is well inside either method's CI width here
    expect(Math.abs(r.lower! / p.lower! - 1)).toBeLessThan(0.05);
    expect(Math.abs(r.upper! / p.upper! - 1)).toBeLessThan(0.05);
  });

  it("is reproducible for a seed", () => {
    const a = robustReferenceLimits(G60, { seed: 9, replicates: 200 });
    expect(robustReferenceLimits(G60, { seed: 9, replicates: 200 })).toEqual(a);
    expect(robustReferenceLimits(G60, { seed: 10, replicates: 200 })).not.toEqual(a);
  });

  it("refuses sizes outside 20 to 119 and a Box-Cox scale without λ", () => {
    expect(() => robustReferenceLimits(G60.slice(0, 19))).toThrow(/20 to 119/);
    expect(() => robustReferenceLimits([...G100, ...G100])).toThrow(StatsInputError);
    expect(() => robustReferenceLimits(G60, { transform: "box-cox" })).toThrow(/needs λ/);
    expect(() => robustLimitsOnScale(G60, { cScale: 0 })).toThrow(/positive/);
  });
});
