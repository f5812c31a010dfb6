import { describe, expect, it } from "vitest";
import { bsplineRow, bsplineValue, roughness, roughnessGradient, roughnessPenalty } from "@/lib/stats/cubic-bspline";
import { StatsInputError } from "@/lib/stats/validate";

// Coefficients that reproduce f(τ) = τ² on J equal intervals: cₖ = ξₖ² − h²/3 with the
// Greville abscissae ξₖ = (k − 1)h (de Boor 1978, the quadratic's B-spline coefficients).
function quadratic(intervals: number): number[] {
  const h = 1 / intervals;
  return Array.from({ length: intervals + 3 }, (_, k) => ((k - 1) * h) ** 2 - (h * h) / 3);
}

describe("uniform cubic B-splines", () => {
  it("sum to one and reproduce a quadratic exactly", () => {
    for (const tau of [0, 0.13, 0.5, 0.777, 1]) {
      const r = bsplineRow(tau, 7);
      expect(r.w0 + r.w1 + r.w2 + r.w3).toBeCloseTo(1, 14);
      expect(bsplineValue(quadratic(7), r)).toBeCloseTo(tau * tau, 14); // f(τ) = τ²
    }
    // de Boor: at a knot the weights are 1/6, 2/3, 1/6, 0.
    const r = bsplineRow(0.5, 2);
    expect(r.index).toBe(1);
    expect([r.w0, r.w1, r.w2, r.w3]).toEqual([1 / 6, 4 / 6, 1 / 6, 0]);
    expect(bsplineRow(1, 4).index).toBe(3); // τ = 1 belongs to the last interval
  });

  it("give the roughness ∫f''² exactly, with and without the matrix", () => {
    // f = τ²: f'' = 2, ∫₀¹ 4 dτ = 4 (calculus).
    for (const j of [1, 5, 24]) {
      const c = quadratic(j);
      expect(roughness(c, j)).toBeCloseTo(4, 9);
      const omega = roughnessPenalty(j);
      const k = j + 3;
      let q = 0;
      for (let r = 0; r < k; r++) for (let s = 0; s < k; s++) q += c[r] * omega[r * k + s] * c[s];
      expect(q).toBeCloseTo(4, 8);
      // The gradient form: cᵀ(Ωc) from roughnessGradient equals the same integral.
      const out = new Float64Array(k);
      roughnessGradient(c, j, out);
      expect(c.reduce((s, v, i) => s + v * out[i], 0)).toBeCloseTo(4, 9);
    }
    // A straight line has no roughness.
    expect(roughness([1, 2, 3, 4, 5, 6], 3)).toBe(0);
    // Interleaved curves: stride 2, offset 1 reads every other coefficient.
    const c = quadratic(5);
    const interleaved = c.flatMap((v) => [99, v]);
    expect(roughness(interleaved, 5, 1, 2)).toBeCloseTo(4, 9);
  });

  it("refuses an impossible number of intervals", () => {
    expect(() => roughnessPenalty(0)).toThrow(new StatsInputError("the number of spline intervals must be an integer ≥ 1 (got 0)"));
  });
});
