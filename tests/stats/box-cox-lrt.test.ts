import { describe, expect, it } from "vitest";
import { boxCoxLrt, chooseScale, CHI_SQUARE_1_95 } from "@/lib/stats/box-cox-lrt";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/scale-choice.json";

// Fixture: scripts/fixtures/scale-choice.R (seeded Gaussian, lognormal and gamma samples; the
// Box-Cox profile likelihood with the Jacobian maximised by R's optimize and cross-checked
// against MASS::boxcox; statistics 2·(ℓ(λ̂) − ℓ(λ0)), p = pchisq(stat, 1, lower.tail = FALSE)).
// ℓ is flat at its maximum, so the statistics agree to rounding in sums of up to 6000 terms
// whatever small difference there is in λ̂: 1e-9 relative to max(1, statistic). A p-value
// moves by d(ln p) ≈ −d(statistic)/2, so its relative tolerance is the same; the fixture's
// p-values reach 5e-197, which the 1-df identity p = 2·Φ(−√statistic) keeps from underflowing
// to 0 as 1 − CDF would. λ̂ itself is located to ~1e-8 where ℓ is curved, but Gaussian data
// far from zero have a nearly flat ℓ (curvature ≈ 0.05 for the sodium set), where rounding
// noise of 1e-13 in ℓ moves the maximiser by a few 1e-6: 1e-5.
const near = (a: number, b: number, tol: number) => Math.abs(a - b) <= tol * Math.max(1, Math.abs(b));
const nearRel = (a: number, b: number, tol: number) => Math.abs(a / b - 1) <= tol;

describe("chooseScale on seeded samples (R: scripts/fixtures/scale-choice.R)", () => {
  it.each(fixture.sets.map((s) => [s.name, s.transform, s] as const))("%s → %s", (_, transform, s) => {
    const c = chooseScale(s.values);
    expect(c.transform).toBe(transform);
    expect(Math.abs(c.scaleChoice.lambdaHat - s.lambdaHat), "λ̂").toBeLessThan(1e-5);
    expect(near(c.scaleChoice.lrtAgainstRaw.statistic, s.lrtAgainstRaw.statistic, 1e-9), "LRT vs raw").toBe(true);
    expect(near(c.scaleChoice.lrtAgainstLn.statistic, s.lrtAgainstLn.statistic, 1e-9), "LRT vs ln").toBe(true);
    const pTol = (stat: number) => 1e-9 * Math.max(1, stat);
    expect(nearRel(c.scaleChoice.lrtAgainstRaw.p, s.lrtAgainstRaw.p, pTol(s.lrtAgainstRaw.statistic)), "p vs raw").toBe(true);
    expect(nearRel(c.scaleChoice.lrtAgainstLn.p, s.lrtAgainstLn.p, pTol(s.lrtAgainstLn.statistic)), "p vs ln").toBe(true);
    expect(c.lambda).toBe(transform === "box-cox" ? c.scaleChoice.lambdaHat : null);
  });

  it("keeps plainly Gaussian data raw even when λ̂ runs to the edge", () => {
    // R (scale-choice.R, "gaussian-60-edge"): λ̂ = 3 on [-3, 3], 2·(ℓ(3) − ℓ(1)) = 0.314, p = 0.575.
    const s = fixture.sets.find((x) => x.name === "gaussian-60-edge")!;
    const c = chooseScale(s.values);
    expect(c.scaleChoice.lambdaHat).toBe(3);
    expect(c.atBoundary).toBe(true);
    expect(c.transform).toBe("none");
  });
});

describe("boxCoxLrt", () => {
  it("matches the METHODS.md §2.2 log-likelihoods", () => {
    // METHODS.md §2.2 (R): 2.1 … 14.2 has ℓ(λ̂) = -9.95516349183, ℓ(1) = -12.53594929014,
    // ℓ(0) = -10.09651956419 (more digits from R's ll(); see tests/stats/box-cox.test.ts).
    // R: 2*(-9.955163491826 + 12.535949290142) = 5.161571596632,
    //    pchisq(5.161571596632, 1, lower.tail = FALSE) = 0.0230822…
    const x = [2.1, 2.9, 3.2, 3.8, 4.4, 5.0, 5.9, 7.3, 9.6, 14.2];
    const raw = boxCoxLrt(x, 1);
    expect(raw.statistic).toBeCloseTo(5.161571596632, 8);
    expect(raw.lambdaHat).toBeCloseTo(-0.303014703304, 6);
    const ln = boxCoxLrt(x, 0);
    expect(ln.statistic).toBeCloseTo(2 * (-9.955163491826 + 10.096519564193), 8);
  });

  it("takes χ²₁,0.95 from @stdlib as the 5% critical value", () => {
    // R: qchisq(0.95, 1) = 3.84145882069412 (the fixture stores it)
    expect(CHI_SQUARE_1_95).toBeCloseTo(fixture.chiSquare1At95, 12);
    expect(CHI_SQUARE_1_95).toBeCloseTo(3.84145882069412, 12);
  });

  it("rejects data it cannot test", () => {
    expect(() => boxCoxLrt([1, 2, -3], 1)).toThrow(StatsInputError);
    expect(() => boxCoxLrt([1, 2, -3], 1)).toThrow(/not positive/);
    expect(() => boxCoxLrt([1, 2], 1)).toThrow(/at least 3 values/);
    expect(() => boxCoxLrt([2, 2, 2], 1)).toThrow(/at least two different values/);
    expect(() => boxCoxLrt([1, 2, 3], Number.NaN)).toThrow(/lambda0 must be a finite number/);
    expect(() => chooseScale([0, 1, 2])).toThrow(/not positive/);
  });
});
