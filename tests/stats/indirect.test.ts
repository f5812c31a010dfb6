import { readFileSync } from "node:fs";
import path from "node:path";
import normal from "@stdlib/stats-base-dists-normal";
import { describe, expect, it } from "vitest";
import { indirectReferenceInterval, indirectReplicates } from "@/lib/stats/indirect";
import { indirectCells, type IndirectCells, type RoutineValue } from "@/lib/stats/indirect-cells";
import { powerNormalScale } from "@/lib/stats/power-normal";
import { tmlCandidates, truncatedMaximumLikelihood } from "@/lib/stats/tml";
import { StatsInputError } from "@/lib/stats/validate";

const ROOT = path.resolve(__dirname, "../..");
function readCsv(name: string): RoutineValue[] {
  const lines = readFileSync(path.join(ROOT, "tests/fixtures/indirect", `${name}.csv`), "utf8").trim().split("\n").slice(1);
  return lines.map((t) => (t.startsWith("<") ? { value: Number(t.slice(1)), side: "below" as const } : Number(t)));
}

/** A non-diseased sample only: n lognormal quantiles exp(μ + σ·Φ⁻¹((i − ½)/n)) (@stdlib), rounded to 0.1. */
function cleanLognormal(n: number, median: number, sigma: number): number[] {
  return Array.from({ length: n }, (_, i) => Math.round(10 * median * Math.exp(sigma * normal.quantile((i + 0.5) / n, 0, 1))) / 10);
}

// Each fit searches about a hundred intervals: generous timeouts for a loaded machine.
describe("truncated maximum likelihood: the fit", { timeout: 60_000 }, () => {
  it("recovers the parameters from exact expected counts (the likelihood's maximum is the truth there)", () => {
    // Cells of width 0.05 from 2 to 8 holding N·P_j of a power-normal with λ = 0.4, μ = 1.2, σ = 0.12
    // (its scale: g(x) = (x^0.4 − 1)/0.4): a multinomial likelihood is largest where the
    // probabilities equal the observed shares, so the fit must return the generating values.
    const truth = { lambda: 0.4, mu: 1.2, sigma: 0.12 };
    const edges = Float64Array.from({ length: 121 }, (_, k) => 2 + 0.05 * k);
    const cdf = (x: number) => normal.cdf(powerNormalScale(x, truth.lambda), truth.mu, truth.sigma);
    const counts = Float64Array.from({ length: 120 }, (_, j) => 1e6 * (cdf(edges[j + 1]) - cdf(edges[j])));
    const total = counts.reduce((a, b) => a + b, 0);
    const cells: IndirectCells = {
      edges,
      counts,
      cellOf: new Int32Array(0),
      n: total,
      resolution: null,
      binWidth: 0.05,
      regular: [0, 120],
      censoredBelow: null,
      censoredAbove: null,
      foldedIntoOpenCells: 0,
    };
    const r = truncatedMaximumLikelihood(cells, { candidates: [{ from: 30, to: 90, lowStep: 5, highStep: 5 }] });
    expect(r.lambda).toBeCloseTo(0.4, 3);
    expect(r.mu).toBeCloseTo(1.2, 4);
    expect(r.sigma).toBeCloseTo(0.12, 4);
    // The cells hold the mass between 2 and 8 only, so the fraction is 1/(F(8) − F(2)).
    expect(r.fraction).toBeCloseTo(1 / (cdf(8) - cdf(2)), 3);
    expect(r.chiSquare).toBeLessThan(1e-4);
    expect(r.truncation).toEqual([edges[30], edges[90]]);
  });

  it("tries intervals that contain the mode, from the narrowest to the widest share on each side", () => {
    const cells = indirectCells(readCsv("power-20k-15"));
    const candidates = tmlCandidates(cells);
    expect(candidates.length).toBeGreaterThan(50);
    const steps = new Set(candidates.map((c) => c.lowStep));
    expect(steps.has(0)).toBe(true);
    expect(steps.has(10)).toBe(true);
    for (const c of candidates) expect(c.to - c.from).toBeGreaterThanOrEqual(6);
  });
});

describe("indirectReferenceInterval", { timeout: 60_000 }, () => {
  it("gives the same document for the same seed, and CIs around the limits", () => {
    const values = readCsv("lognormal-5k-10");
    const a = indirectReferenceInterval(values, { seed: 7, replicates: 100 });
    const b = indirectReferenceInterval(values, { seed: 7, replicates: 100 });
    expect(a).toEqual(b);
    expect(a.n).toBe(5000);
    expect(a.bootstrap).toMatchObject({ replicates: 100, level: 0.9, seed: 7 });
    expect(a.bootstrap.used).toBeGreaterThanOrEqual(50);
    const [l0, l1] = a.lowerCi as [number, number];
    const [u0, u1] = a.upperCi as [number, number];
    expect(l0).toBeLessThanOrEqual(l1);
    expect(u0).toBeLessThanOrEqual(u1);
    expect(l1).toBeLessThan(u0);
    expect(a.secondOpinion.method).toBe("bhattacharya");
    expect(a.warnings).toEqual(["The 90% CIs come from 100 bootstrap replicates."]);
  }, 60_000);

  it("uses 200 replicates up to 20,000 values and 100 above, and says so", () => {
    expect(indirectReplicates(20_000)).toBe(200);
    expect(indirectReplicates(20_001)).toBe(100);
  });

  it("skips the CIs with 0 replicates and keeps censored values in n, saying how they were used", () => {
    const r = indirectReferenceInterval(readCsv("lognormal-20k-20-censored"), { replicates: 0 });
    expect(r.n).toBe(20_000);
    expect(r.lowerCi).toBeNull();
    expect(r.upperCi).toBeNull();
    // The R script reported 376 values as "<0.30".
    expect(r.censored).toEqual({ below: 376, belowLimit: 0.3, above: 0, aboveLimit: null });
    expect(r.warnings).toEqual([
      "376 below 0.3 were reported censored; they count in n and in the likelihood of the open end cells, never as numbers.",
    ]);
  });

  it("warns of a fraction below 60%, a truncation at its search edge, and a disagreeing second opinion", () => {
    // sqrt-10k-30 (70% non-diseased) with each value above 100 counted three times (45% diseased).
    const base = readCsv("sqrt-10k-30") as number[];
    const values = [...base, ...base.filter((v) => v > 100), ...base.filter((v) => v > 100)];
    const r = indirectReferenceInterval(values, { replicates: 0 });
    expect(r.fraction).toBeLessThan(0.6);
    expect(r.warnings).toEqual([
      expect.stringMatching(/^The estimated non-diseased fraction is \d+\.\d%, below 60%/),
      "The truncation interval's upper end lies at the edge of its search: the fit needed the narrowest or the widest interval tried, so the limits may be unreliable.",
      expect.stringMatching(/^Bhattacharya's procedure disagrees with the truncated maximum likelihood by more than 15% of the interval's width/),
    ]);
  });

  it("finds the limits of a sample with no diseased values, with a fraction near 1", () => {
    const r = indirectReferenceInterval(cleanLognormal(5000, 25, 0.3), { replicates: 0 });
    // R: exp(log(25) + qnorm(c(.025, .975))*0.3) = 13.886076, 45.009115; the sample is those quantiles rounded.
    expect(r.lower as number).toBeCloseTo(13.886, 0);
    expect(r.upper as number).toBeCloseTo(45.009, 0);
    expect(r.fraction).toBeCloseTo(1, 1);
    expect(r.accepted).toBe(true);
  });

  it("never ends the truncation interval at +∞, even when many values are censored above", () => {
    // The clean sample with everything above 30 (about 27% of it) reported as ">30".
    const values: RoutineValue[] = cleanLognormal(5000, 25, 0.3).map((v) => (v > 30 ? { value: 30, side: "above" as const } : v));
    const r = indirectReferenceInterval(values, { replicates: 0 });
    expect(r.censored.above).toBeGreaterThan(1000);
    expect(Number.isFinite(r.truncation[1])).toBe(true);
    expect(r.truncation[1]).toBeLessThanOrEqual(30);
    expect(r.fraction).toBeLessThanOrEqual(1);
    expect(r.lower as number).toBeCloseTo(13.886, 0);
  });

  it("refuses bad options and unusable values", () => {
    const values = cleanLognormal(200, 25, 0.3);
    expect(() => indirectReferenceInterval(values, { replicates: 50 })).toThrow(StatsInputError);
    expect(() => indirectReferenceInterval(values, { replicates: 50 })).toThrow(/0 or an integer of at least 100/);
    expect(() => indirectReferenceInterval(values, { seed: 1.5 })).toThrow(/seed must be an integer/);
    expect(() => indirectReferenceInterval([...values, -2])).toThrow(/not positive/);
  });
});
