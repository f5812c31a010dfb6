import { describe, expect, it } from "vitest";
import {
  AS243_MAX_NONCENTRALITY,
  noncentralTCdf,
  noncentralTCdfAs243,
  noncentralTCdfByIntegration,
  noncentralTQuantile,
} from "@/lib/stats/noncentral-t";
import { StatsInputError } from "@/lib/stats/validate";
import fixture from "../fixtures/noncentral-t.json";

// Fixture: scripts/fixtures/noncentral-t.R. "grid" and "points" are R's pt/qt (AS 243 in
// full: ncp < 37.62); "large" and "largeCdf" are stats::integrate of E[pnorm(t·u − ncp)] over
// u = sqrt(χ²/df), cross-checked in R against a second integral form, never R's qt.

/** |a − b| ≤ tol·max(1, |b|): relative for large values, absolute near zero. */
const near = (a: number, b: number, tol: number) => Math.abs(a - b) <= tol * Math.max(1, Math.abs(b));

describe("noncentralTCdf against R's pt where R is accurate (AS 243)", () => {
  // Both sides sum the same twin series to R's bound of 1e-12 on the remainder; R takes
  // I_x(1/2, df/2) from pbeta, this code from @stdlib's t CDF. 2e-12 absolute covers both.
  it.each(fixture.grid.map((g) => [g.df, g.ncp, g.q, g.cdfAtQ]))(
    "df %s, ncp %s: pt(%s) = %s",
    (df, ncp, q, p) => {
      expect(Math.abs(noncentralTCdf(q, df, ncp) - p)).toBeLessThan(2e-12);
    },
  );

  it("at negative t, t = 0 and in a far tail", () => {
    for (const e of fixture.points) {
      expect(Math.abs(noncentralTCdf(e.t, e.df, e.ncp) - e.cdf), JSON.stringify(e)).toBeLessThan(2e-12);
    }
  });
});

describe("noncentralTQuantile against R's qt where R is accurate (AS 243)", () => {
  // R's qt bisects to a relative width of 1e-13 on pt; both invert CDFs that agree to 2e-12
  // (above), so the quantiles differ by at most 2e-12/f(q), f the density. On this grid
  // f(q)·max(1, |q|) ≥ 1e-3 (the least in the heavy tails of df = 1 at p = 0.001 and 0.999,
  // where f(q)·|q| ≈ min(p, 1 − p)), hence 2e-9 relative.
  it.each(fixture.grid.map((g) => [g.df, g.ncp, g.p, g.q]))(
    "df %s, ncp %s: qt(%s) = %s",
    (df, ncp, p, q) => {
      const got = noncentralTQuantile(p, df, ncp);
      expect(near(got, q, 2e-9), `${got} vs ${q}`).toBe(true);
    },
  );
});

describe("the exact CI factor of METHODS.md §2.3", () => {
  // METHODS.md §2.3, table "exact 90% CI of k" (COMPUTED with R), printed to 4 decimals:
  // k = qt(q, n − 1, 1.959964·√n)/√n, e.g. Rscript -e 'qt(0.95, 19, 1.959964*sqrt(20))/sqrt(20)'
  // prints 2.809543. 5e-5 is half a unit of the last printed digit.
  const table: [number, number, number][] = [
    [20, 1.4426, 2.8095],
    [40, 1.5754, 2.501],
    [120, 1.7251, 2.2451],
    [240, 1.7898, 2.155],
  ];
  it.each(table)("n = %s: %s – %s", (n, lo, hi) => {
    const delta = 1.959964 * Math.sqrt(n);
    expect(Math.abs(noncentralTQuantile(0.05, n - 1, delta) / Math.sqrt(n) - lo)).toBeLessThan(5e-5);
    expect(Math.abs(noncentralTQuantile(0.95, n - 1, delta) / Math.sqrt(n) - hi)).toBeLessThan(5e-5);
  });
});

describe("above the AS 243 range (ncp > 37.62): against an independent integral in R", () => {
  // Not against R's qt, which switches to a normal approximation there: at n = 369 it gives
  // k = 2.115626589 for q = 0.95, 6.4e-4 above the value below (scripts/fixtures/noncentral-t.R
  // prints the comparison). R's integrate ran with rel.tol 1e-13 and its root with tol 1e-13;
  // the two R forms agree to 1e-12. 1e-10 relative on k is well inside that.
  it.each(fixture.large.map((g) => [g.n, g.p, g.k, g.df, g.ncp]))(
    "n = %s, q = %s: k = %s",
    (n, p, k, df, ncp) => {
      const got = noncentralTQuantile(p, df, ncp) / Math.sqrt(n);
      expect(Math.abs(got / k - 1), `${got} vs ${k}`).toBeLessThan(1e-10);
    },
  );

  it("gives the CDF at chosen points, also where R's pt goes wrong with ncp < 37.62", () => {
    // R integrate, both forms agreeing to 1e-12 (scripts/fixtures/noncentral-t.R): 1e-12
    // absolute. The last three points have a large df and t: there AS 243's series underflows
    // and R's pt(40, 20000, 37.5) prints 0.999999999999254 against the integral's 0.992876873.
    for (const e of fixture.largeCdf) {
      expect(Math.abs(noncentralTCdf(e.t, e.df, e.ncp) - e.cdf), JSON.stringify(e)).toBeLessThan(1e-12);
    }
  });
});

describe("continuity across the switch from AS 243 to the integral", () => {
  it("puts the switch where R's AS 243 stops", () => {
    // R's pnt switches at ncp² > 2·ln 2·1021 (from R's source, from memory): √1415.4 = 37.62.
    expect(AS243_MAX_NONCENTRALITY).toBeCloseTo(37.62, 2);
  });

  it("both methods agree where both are valid", () => {
    // Two independent computations of the same probability; each is checked against R above.
    // 1e-12 absolute: the integral's truncation is below 1e-15, AS 243's remainder below 1e-13,
    // and @stdlib's t density, from which AS 243 starts, is good to 1e-13 up to df = 1000.
    for (const [t, df, ncp] of [
      [37.6, 367, 37.5],
      [34.9, 367, 37.598],
      [40.6, 367, 37.598],
      [30, 200, 30],
      [41, 1000, 37.6],
      [60, 900, 37],
      // where coarser quadrature panels went wrong while this code was written: heavy tails
      // with about one degree of freedom, and a negative δ with t far out
      [50.5, 1.026, 2.108],
      [60.45, 1.049, 5.308],
      [404.9, 1.012, 34.69],
      [-8.865, 24, -19.722],
      [-3.646, 20.311, -28.625],
      [5, 10, 4],
      [-1, 30, 0.5],
    ]) {
      const a = noncentralTCdfAs243(t, df, ncp);
      const b = noncentralTCdfByIntegration(t, df, ncp);
      expect(Math.abs(a - b), `t ${t}, df ${df}, ncp ${ncp}: ${a} vs ${b}`).toBeLessThan(1e-12);
    }
  });

  it("has no step in the quantile at the switch", () => {
    // A quantile is continuous in ncp; its slope is about 1 here, so a 2e-9 change of ncp may
    // move it by about 2e-9 and no more.
    const below = noncentralTQuantile(0.95, 368, AS243_MAX_NONCENTRALITY - 1e-9);
    const above = noncentralTQuantile(0.95, 368, AS243_MAX_NONCENTRALITY + 1e-9);
    expect(Math.abs(above - below)).toBeLessThan(5e-9);
    const lo = noncentralTQuantile(0.05, 368, -AS243_MAX_NONCENTRALITY - 1e-9);
    const hi = noncentralTQuantile(0.05, 368, -AS243_MAX_NONCENTRALITY + 1e-9);
    expect(Math.abs(hi - lo)).toBeLessThan(5e-9);
  });
});

describe("input checks", () => {
  it("rejects what it cannot compute", () => {
    expect(() => noncentralTCdf(1, 0, 1)).toThrow(StatsInputError);
    expect(() => noncentralTCdf(1, 0, 1)).toThrow(/df must be a positive number/);
    expect(() => noncentralTCdf(Number.NaN, 3, 1)).toThrow(/t must be a finite number/);
    expect(() => noncentralTCdf(1, 3, Infinity)).toThrow(/delta must be a finite number/);
    expect(() => noncentralTQuantile(1, 3, 1)).toThrow(/p must be a number strictly between 0 and 1/);
    expect(() => noncentralTQuantile(0.5, -2, 1)).toThrow(/df must be a positive number/);
  });
});
