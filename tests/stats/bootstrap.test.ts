import { describe, expect, it } from "vitest";
import { percentileBootstrap } from "@/lib/stats/bootstrap";
import { mean } from "@/lib/stats/descriptive";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/reference-limits.json";

const SET = fixture.sets.find((s) => s.name === "gaussian-120")!;
const X = SET.values;
const meanStat = (s: number[]) => [mean(s)];

describe("percentileBootstrap", () => {
  it("is reproducible for a seed", () => {
    const a = percentileBootstrap(X, meanStat, { seed: 11 });
    const b = percentileBootstrap(X, meanStat, { seed: 11 });
    const c = percentileBootstrap(X, meanStat, { seed: 12 });
    expect(a).toEqual(b);
    expect(a).not.toEqual(c);
  });

  it("brackets the mean like the normal-theory 90% interval", () => {
    // Theory (common practice): the 90% CI of a mean is about x̄ ± 1.645·s/√n, with x̄ and s
    // from R (mean(x), sd(x) in scripts/fixtures/reference-limits.R). With B = 1000 the
    // Monte-Carlo error of a 5th percentile is ~5% of the half-width; allow 15%.
    const [ci] = percentileBootstrap(X, meanStat, { seed: 3 });
    const half = (1.6448536269514722 * SET.sd) / Math.sqrt(X.length);
    expect(ci!.used).toBe(1000);
    expect(Math.abs(ci!.lower - (SET.mean - half))).toBeLessThan(0.15 * half);
    expect(Math.abs(ci!.upper - (SET.mean + half))).toBeLessThan(0.15 * half);
  });

  it("leaves out replicates where the statistic is not computable", () => {
    let k = 0;
    const [always, never] = percentileBootstrap(X, () => [1, k++ % 4 === 0 ? 2 : null], {
      replicates: 200,
    });
    expect(always).toEqual({ lower: 1, upper: 1, used: 200 });
    expect(never).toBeNull(); // only a quarter of the replicates gave a value
  });

  it("rejects bad options", () => {
    expect(() => percentileBootstrap([], meanStat)).toThrow(StatsInputError);
    expect(() => percentileBootstrap(X, meanStat, { replicates: 10 })).toThrow(/at least 100/);
    expect(() => percentileBootstrap(X, meanStat, { level: 1 })).toThrow(/level/);
    expect(() => percentileBootstrap(X, meanStat, { seed: 0.5 })).toThrow(/seed/);
  });
});
