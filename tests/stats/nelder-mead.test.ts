import { describe, expect, it } from "vitest";
import { nelderMead } from "@/lib/stats/nelder-mead";
import { StatsInputError } from "@/lib/stats/validate";

describe("nelderMead", () => {
  it("finds the minimum of Rosenbrock's function at (1, 1)", () => {
    // Rosenbrock HH. Comput J 1960;3:175–184: f = 100(y − x²)² + (1 − x)², minimum 0 at (1, 1).
    const r = nelderMead(([x, y]) => 100 * (y - x * x) ** 2 + (1 - x) ** 2, [-1.2, 1], { maxEvaluations: 2000, tolerance: 1e-14 });
    expect(r.converged).toBe(true);
    expect(r.x[0]).toBeCloseTo(1, 4);
    expect(r.x[1]).toBeCloseTo(1, 4);
    expect(r.fx).toBeLessThan(1e-8);
  });

  it("treats a non-finite value as +∞ and stays where the function is defined", () => {
    const r = nelderMead(([x]) => (x > 0 ? (Math.log(x) - 1) ** 2 : Number.NaN), [0.5], { steps: [0.5] });
    expect(r.x[0]).toBeCloseTo(Math.E, 4);
  });

  it("stops at its evaluation budget and says it did not converge", () => {
    const r = nelderMead(([x, y]) => 100 * (y - x * x) ** 2 + (1 - x) ** 2, [-1.2, 1], { maxEvaluations: 20 });
    expect(r.converged).toBe(false);
    expect(r.evaluations).toBeLessThanOrEqual(22);
  });

  it("refuses an empty or non-finite start and steps of the wrong length", () => {
    expect(() => nelderMead(() => 0, [])).toThrow(StatsInputError);
    expect(() => nelderMead(() => 0, [Number.NaN])).toThrow(/finite/);
    expect(() => nelderMead(() => 0, [1, 2], { steps: [1] })).toThrow(/2 entries/);
  });
});
