import { describe, expect, it } from "vitest";
import { estimateReferenceInterval, type DonorValue } from "@/lib/stats/estimate";
import { nonparametricLimitsCensored } from "@/lib/stats/nonparametric-censored";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/censored-limits.json";

// Expected values: scripts/fixtures/censored-limits.R. R's quantile(type = 6) and order
// statistics on each sample with its censored values replaced by a number below the minimum
// (or above the maximum) give the limits and CI ends whose ranks are not censored; where a rank
// is censored the fixture holds the bound (the censoring limit, interpolated as the rank rule
// says) and "<" or ">". Tolerance 1e-12 absolute on values of order 1: one interpolation in
// double precision, which R and we may round differently in the last bit.
type Set = (typeof fixture.sets)[number];
const set = (name: string): Set => fixture.sets.find((s) => s.name === name)!;
const values = (s: Set) => s.values as DonorValue[];

const split = (s: Set) => {
  const below: number[] = [];
  const above: number[] = [];
  const measured: number[] = [];
  for (const v of values(s)) {
    if (typeof v === "number") measured.push(v);
    else (v.side === "below" ? below : above).push(v.value);
  }
  return { below, above, measured: measured.sort((a, b) => a - b) };
};

describe("nonparametric limits with censored values (R: scripts/fixtures/censored-limits.R)", () => {
  it.each(fixture.sets.map((s) => [s.name, s] as const))("%s", (_, s) => {
    const { below, above, measured } = split(s);
    expect(below.length).toBe(s.below);
    expect(above.length).toBe(s.above);
    const r = nonparametricLimitsCensored(below, measured, above);
    expect(r.lower).toBeCloseTo(s.lower, 12);
    expect(r.upper).toBeCloseTo(s.upper, 12);
    expect(r.lowerCensored).toBe(s.lowerCensored);
    expect(r.upperCensored).toBe(s.upperCensored);
    if (s.ci === null) {
      expect(r.lowerCi).toBeNull();
      expect(r.upperCi).toBeNull();
    } else {
      expect(r.lowerCi![0]).toBeCloseTo(s.ci.lowerCi[0], 12);
      expect(r.lowerCi![1]).toBeCloseTo(s.ci.lowerCi[1], 12);
      expect(r.upperCi![0]).toBeCloseTo(s.ci.upperCi[0], 12);
      expect(r.upperCi![1]).toBeCloseTo(s.ci.upperCi[1], 12);
      expect(r.lowerCiCensored).toEqual(s.ci.lowerCiCensored);
      expect(r.upperCiCensored).toEqual(s.ci.upperCiCensored);
    }
  });

  it("is the plain rank rule when nothing is censored", () => {
    // METHODS.md §1.1 check value (R quantile type 6): 1 … 120 → 3.025 and 117.975, CI ranks 1–7, 114–120.
    const x = Array.from({ length: 120 }, (_, i) => i + 1);
    const r = nonparametricLimitsCensored([], x, []);
    // 1e-12: 0.025·121 is 3.0250000000000004 in double precision.
    expect(r.lower).toBeCloseTo(3.025, 12);
    expect(r.upper).toBeCloseTo(117.975, 12);
    expect(r).toMatchObject({
      lowerCensored: null, upperCensored: null,
      lowerCi: [1, 7], upperCi: [114, 120], lowerCiCensored: [null, null], upperCiCensored: [null, null],
    });
  });

  it("gives no limit that would need a value censored below and one above", () => {
    // 20 below, 20 above, nothing measured: n = 40, r = 0.025·41 = 1.025 (ranks 1 and 2, both
    // below) and 0.975·41 = 39.975 (39 and 40, above); bounds are the limits themselves.
    const r = nonparametricLimitsCensored(Array(20).fill(0.5), [], Array(20).fill(9));
    expect([r.lower, r.lowerCensored, r.upper, r.upperCensored]).toEqual([0.5, "<", 9, ">"]);
    // 1 below and 38 above, n = 39: r = 0.025·40 = 1 exactly, the value censored below.
    const mixed = nonparametricLimitsCensored([0.5], [], Array(38).fill(9));
    expect([mixed.lower, mixed.lowerCensored]).toEqual([0.5, "<"]);
    // 1 below and 39 above, n = 40: r = 0.025·41 = 1.025 lies between rank 1 (below) and
    // rank 2 (above): no limit.
    const both = nonparametricLimitsCensored([0.5], [], Array(39).fill(9));
    expect([both.lower, both.lowerCensored]).toEqual([null, null]);
  });

  it("rejects measured values out of order and non-finite limits", () => {
    expect(() => nonparametricLimitsCensored([], [2, 1], [])).toThrow(
      new StatsInputError("measured values must be sorted ascending (index 1 breaks the order)"),
    );
    expect(() => nonparametricLimitsCensored([Number.NaN], [1], [])).toThrow(
      new StatsInputError("limits of values censored below[0] is not a finite number (NaN)"),
    );
  });
});

describe("the estimate with censored values", () => {
  it("counts them in n and the ranks, leaves them out of the parametric fit, and says how many", () => {
    const s = set("lognormal-200-heavy");
    const d = estimateReferenceInterval(values(s), { outliers: "none", transform: "none" });
    expect(d.n).toBe(200);
    expect(d.censored).toEqual({ below: 19, above: 0, fraction: 19 / 200 });
    expect(d.nonparametric.lower).toBeCloseTo(s.lower, 12);
    expect(d.nonparametric.lowerCensored).toBe("<");
    expect(d.nonparametric.upper).toBeCloseTo(s.upper, 12);
    expect(d.nonparametric.upperCensored).toBeNull();
    // R: mean and sd of the 181 measured values; limits mean ± qnorm(0.975)·sd. 1e-9 relative,
    // as for the uncensored raw-scale limits in estimate.test.ts.
    expect(Math.abs(d.parametric.mean! / s.measuredMean - 1)).toBeLessThan(1e-9);
    expect(Math.abs(d.parametric.sd! / s.measuredSd - 1)).toBeLessThan(1e-9);
    expect(Math.abs(d.parametric.lower! / s.rawLower - 1)).toBeLessThan(1e-9);
    expect(Math.abs(d.parametric.upper! / s.rawUpper - 1)).toBeLessThan(1e-9);
    expect(d.warnings).toContain(
      "19 censored values (19 below a limit, 0 above) are counted in the nonparametric ranks but left out of the " +
        "parametric and robust limits, the outlier screen and the normality tests.",
    );
    expect(d.warnings).toContain(`The nonparametric lower limit falls on a censored value: it is only known to be < ${s.lower}.`);
    expect(d.recommended).toBe("nonparametric");
    expect(d.warnings).toContain(
      "9.5% of the values are censored (more than 5%): the nonparametric method is advised, because it ranks " +
        "the censored values and the parametric and robust fits leave them out, which biases them.",
    );
  });

  it("advises the nonparametric method below 120 values when more than 5% are censored", () => {
    const heavy = estimateReferenceInterval(values(set("gaussian-80-censored")), { outliers: "none" });
    expect(heavy.n).toBe(80);
    expect(heavy.recommended).toBe("nonparametric");
    expect(heavy.nonparametric.lowerCi).toBeNull();
    expect(heavy.warnings).toContain("Nonparametric 90% CIs are not given: with censored values they need at least 119 values (have 80).");
    // 3.75% censored: the advice follows the usual rule for 20–119 values.
    const light = estimateReferenceInterval(values(set("gaussian-80-light")), { outliers: "none" });
    expect(light.recommended === "parametric" || light.recommended === "robust").toBe(true);
    expect(light.nonparametric.lowerCensored).toBe("<");
  });

  it("screens the measured values only and reports positions in the values given", () => {
    const s = set("lognormal-300-light");
    const given = [...values(s), 46];
    const d = estimateReferenceInterval(given, { outliers: "dixon", screening: "apply" });
    expect(d.excluded).toHaveLength(1);
    expect(d.excluded[0]).toMatchObject({ value: 46, index: 300 });
    expect(d.n).toBe(300);
    expect(d.censored).toEqual({ below: 4, above: 2, fraction: 6 / 300 });
    expect(d.nonparametric.lower).toBeCloseTo(s.lower, 12);
    expect(d.nonparametric.upper).toBeCloseTo(s.upper, 12);
    expect(d.nonparametric.lowerCiCensored).toEqual(["<", null]);
    expect(d.screening.valuesGiven).toBe(301);
  });

  it("takes plain numbers as before and refuses a malformed censored value", () => {
    expect(() => estimateReferenceInterval([1, 2, { value: 0.5, side: "under" } as never])).toThrow(
      new StatsInputError('values[2] must be a finite number or a censored value { value, side: "below" | "above" } (got {"value":0.5,"side":"under"})'),
    );
    expect(() => estimateReferenceInterval([1, { value: Number.POSITIVE_INFINITY, side: "above" }])).toThrow(/values\[1\] must be/);
  });
});
