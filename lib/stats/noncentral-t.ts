/**
 * The noncentral t distribution: T = (Z + δ)/√(χ²_ν/ν), with Z standard normal and χ²_ν
 * independent. Its quantiles give the exact confidence interval of a Gaussian percentile
 * μ + z·σ (METHODS.md §2.3).
 */
import chisquare from "@stdlib/stats-base-dists-chisquare";
import normal from "@stdlib/stats-base-dists-normal";
import tDist from "@stdlib/stats-base-dists-t";
import { brentRoot } from "./brent-root";
import { gaussLegendreRule, integrateGaussLegendre } from "./gauss-legendre";
import { assertFiniteNumber, assertOpenProbability, StatsInputError } from "./validate";

/**
 * Largest |δ| for which AS 243 is used: e^(−δ²/2), the first Poisson weight of its series,
 * stays a normal double up to δ² = 2·ln 2·1021. R's pnt stops at the same point.
 */
export const AS243_MAX_NONCENTRALITY = Math.sqrt(2 * Math.LN2 * 1021);

/**
 * Largest ν for which AS 243 is used. Its series start from (1 − x)^(ν/2), x = t²/(t² + ν),
 * and from the central t density at t. With a large ν and t the first underflows to 0, every
 * later term with it, and the sum is wrong (R's pt shares this: pt(40, 20000, 37.5) gives
 * 0.99999999999925 where the probability is 0.992876873); up to ν = 1000 and |δ| ≤ 37.62 that
 * happens only beyond |t| = 54, where the CDF is 0 or 1 within 1e−30. And @stdlib's t density loses
 * relative precision as ν grows (against R's dt: 1.5e−12 at ν = 1e5, 2e−11 at 1e6), which
 * AS 243 passes on. Up to 1000 it agrees with the integral to 5e−13.
 */
export const AS243_MAX_DF = 1000;

/** AS 243 stops when its bound on the remaining terms falls below this. */
const ERRMAX = 1e-13;
/** Terms of the series; about δ²/2 + 8δ are needed, under 1000 up to the switch. */
const ITRMAX = 2000;
const SQRT_2_OVER_PI = Math.sqrt(2 / Math.PI);

/** Whether AS 243 computes P(T ≤ t) accurately; elsewhere the integral is used. */
function as243Applies(df: number, delta: number): boolean {
  return Math.abs(delta) <= AS243_MAX_NONCENTRALITY && df <= AS243_MAX_DF;
}

function assertDf(df: number): void {
  if (typeof df !== "number" || !Number.isFinite(df) || !(df > 0)) {
    throw new StatsInputError(`df must be a positive number (got ${String(df)})`);
  }
}

/**
 * Lenth's AS 243 without input checks: Guenther's twin series of incomplete beta functions
 * weighted by the Poisson(δ²/2) probabilities, plus Φ(−δ). The two starting incomplete beta
 * values come from the central t distribution (@stdlib): I_x(1/2, ν/2) = P(|T_ν| ≤ t) and
 * I_x(1/2, ν/2) − I_x(3/2, ν/2) = 2t·f_ν(t), with x = t²/(t² + ν).
 */
function as243(t: number, df: number, delta: number): number {
  const negative = t < 0;
  const tt = negative ? -t : t;
  const del = negative ? -delta : delta;
  let tnc = 0;
  if (tt > 0) {
    const x = (tt * tt) / (tt * tt + df);
    const lambda = del * del;
    let p = 0.5 * Math.exp(-0.5 * lambda);
    let q = SQRT_2_OVER_PI * p * del;
    let s = 0.5 - p;
    let a = 0.5;
    const b = 0.5 * df;
    // (1 − x)^b, with 1 − x = ν/(t² + ν) taken without cancellation.
    const logRxb = -b * Math.log1p((tt * tt) / df);
    const rxb = Math.exp(logRxb);
    let xodd = 1 - 2 * tDist.cdf(-tt, df);
    let godd = 2 * tt * tDist.pdf(tt, df);
    let xeven = -Math.expm1(logRxb);
    let geven = b * x * rxb;
    tnc = p * xodd + q * xeven;
    for (let en = 1; en <= ITRMAX; en++) {
      a += 1;
      xodd -= godd;
      xeven -= geven;
      godd *= (x * (a + b - 1)) / a;
      geven *= (x * (a + b - 0.5)) / (a + 0.5);
      p *= lambda / (2 * en);
      q *= lambda / (2 * en + 1);
      s -= p;
      tnc += p * xodd + q * xeven;
      if (!(2 * s * (xodd - godd) > ERRMAX)) break;
    }
  }
  tnc += normal.cdf(-del, 0, 1);
  return negative ? 1 - tnc : tnc;
}

/**
 * Where the density of s = ln u, u = √(χ²_ν/ν), lives: outside [lo, hi] lies less than 2e−16
 * of it. On the log scale the density, ∝ e^(νs − νe^(2s)/2), is smooth for every ν, where the
 * density of u itself has a cusp at 0 for ν < 2.
 */
interface LogURange {
  lo: number;
  hi: number;
  /** log of the density of s at s = 0. */
  logDensityAt0: number;
}

const TAIL = 1e-16;
const RULE = gaussLegendreRule(12);
/** Panels span at most this many local scales of the integrand (see addPanels). */
const PANEL_SCALES = 1.5;
/** Beyond |t·u − δ| = 10, Φ(t·u − δ) is 0 or 1 within 8e−24. */
const STEP_HALF_WIDTH = 10;

function logURange(df: number): LogURange {
  const qLo = chisquare.quantile(TAIL, df);
  return {
    // Below df ≈ 0.1 the lower quantile underflows; the smallest double stands in for it.
    lo: 0.5 * Math.log(Math.max(qLo, Number.MIN_VALUE) / df),
    hi: 0.5 * Math.log(chisquare.quantile(1 - TAIL, df) / df),
    logDensityAt0: Math.log(2 * df) + chisquare.logpdf(df, df),
  };
}

/**
 * Appends breakpoints from a to b, each panel as wide as `width` at its left end allows. The
 * log-density of s, ν·s − ν·e^(2s)/2 + const, has curvature −2ν·e^(2s), so a local scale of
 * e^(−s)/√(2ν): right of 0 it narrows, and for small ν the density falls off fast there; left
 * of 0 the bulk's 1/√(2ν) is kept, since the tail there is nearly e^(νs), which wider panels
 * would not follow. Where Φ(t·eˢ − δ) changes, panels are no wider than 1/(|δ| + 10) (times
 * PANEL_SCALES, as everywhere).
 */
function addPanels(breaks: number[], a: number, b: number, width: (s: number) => number): void {
  let s = a;
  while (s < b) {
    s = Math.min(b, s + width(s));
    breaks.push(s);
  }
}

function byIntegration(t: number, df: number, delta: number, r: LogURange): number {
  if (t === 0) return normal.cdf(-delta, 0, 1);
  const { lo, hi, logDensityAt0 } = r;
  // log g(s) = log g(0) + ν·(s − (e^(2s) − 1)/2) for s = ln u (the Jacobian e^s included);
  // expm1 keeps the small difference exact where ν is large and s near 0.
  const g = (s: number) =>
    Math.exp(logDensityAt0 + df * (s - 0.5 * Math.expm1(2 * s))) * normal.cdf(t * Math.exp(s) - delta, 0, 1);
  const densityWidth = (s: number) => PANEL_SCALES * Math.min(1, Math.exp(-Math.max(0, s)) / Math.sqrt(2 * df));
  const stepWidth = PANEL_SCALES / (Math.abs(delta) + STEP_HALF_WIDTH);
  // Φ(t·u − δ) changes where |t·u − δ| < 10, i.e. u between (δ − 10)/t and (δ + 10)/t; there
  // its argument moves by at most |δ| + 10 per unit of s.
  const u1 = (delta - STEP_HALF_WIDTH) / t;
  const u2 = (delta + STEP_HALF_WIDTH) / t;
  const uMax = Math.max(u1, u2);
  const uMin = Math.min(u1, u2);
  const a = uMin > 0 ? Math.max(lo, Math.log(uMin)) : lo;
  const b = uMax > 0 ? Math.min(hi, Math.log(uMax)) : lo;
  const breaks = [lo];
  if (a < b) {
    if (a > lo) addPanels(breaks, lo, a, densityWidth);
    addPanels(breaks, a, b, (s) => Math.min(densityWidth(s), stepWidth));
    if (b < hi) addPanels(breaks, b, hi, densityWidth);
  } else {
    addPanels(breaks, lo, hi, densityWidth);
  }
  return Math.min(1, Math.max(0, integrateGaussLegendre(g, breaks, RULE)));
}

/**
 * Noncentral t CDF by Lenth's algorithm AS 243 alone (the method {@link noncentralTCdf} uses
 * for |δ| ≤ 37.62 and ν ≤ 1000), exported so that the two methods can be checked against each
 * other.
 * @see Lenth RV. Algorithm AS 243: Cumulative distribution function of the non-central t
 *   distribution. Appl Stat 1989;38:185–189; Guenther WC. J Stat Comput Simul 1978;6:199–206.
 * Complexity O(δ² + |δ|) terms. Accurate to about 1e−12 for |δ| ≤ 37.62 and ν ≤ 1000; past
 *   either, the start of a series can underflow and the result be wrong.
 * Throws StatsInputError on a non-finite t or δ, or df ≤ 0.
 * @example noncentralTCdfAs243(2, 10, 1) // 0.80761… (R: pt(2, 10, 1))
 */
export function noncentralTCdfAs243(t: number, df: number, delta: number): number {
  assertFiniteNumber(t, "t");
  assertDf(df);
  assertFiniteNumber(delta, "delta");
  return as243(t, df, delta);
}

/**
 * Noncentral t CDF by numerical integration: P(T ≤ t) = E[Φ(t·u − δ)], u = √(χ²_ν/ν), as
 * ∫ g(s)·Φ(t·eˢ − δ) ds over s = ln u between its 1e−16 and 1 − 1e−16 quantiles, by composite
 * 12-point Gauss-Legendre quadrature on panels of at most 1.5 local scales of the integrand:
 * 1.5/√(2ν) (less in the right tail) and, where Φ changes, 1.5/(|δ| + 10).
 * This is the method {@link noncentralTCdf} uses where AS 243 does not apply.
 * @see Owen DB. A survey of properties and applications of the noncentral t-distribution.
 *   Technometrics 1968;10:445–478 (the integral over the χ distribution); Abramowitz M,
 *   Stegun IA. Handbook of Mathematical Functions, 1964, 25.4.29 (Gauss-Legendre).
 * Complexity O(panels): about 25 panels of 12 points where t ≈ δ and ν is large, more for
 *   small ν. Accurate to about 1e−13 for df ≥ 1.
 * Throws StatsInputError on a non-finite t or δ, or df ≤ 0.
 * @example noncentralTCdfByIntegration(40, 368, 38) // 0.86615…
 */
export function noncentralTCdfByIntegration(t: number, df: number, delta: number): number {
  assertFiniteNumber(t, "t");
  assertDf(df);
  assertFiniteNumber(delta, "delta");
  return byIntegration(t, df, delta, logURange(df));
}

/**
 * Cumulative distribution function of the noncentral t distribution with df degrees of
 * freedom (not necessarily an integer) and noncentrality δ: Lenth's AS 243 (the algorithm of
 * R's pt(q, df, ncp)) for |δ| ≤ 37.62 and ν ≤ 1000; elsewhere, where AS 243's series
 * underflows or loses digits (and R falls back on a normal approximation or goes wrong),
 * numerical integration of E[Φ(t·u − δ)] over u = √(χ²_ν/ν).
 * @see Lenth RV. Algorithm AS 243. Appl Stat 1989;38:185–189; Owen DB. Technometrics
 *   1968;10:445–478; see {@link noncentralTCdfAs243} and {@link noncentralTCdfByIntegration}.
 * Complexity O(δ²) with AS 243, O(1) (a few hundred evaluations of Φ) with the integral.
 * Throws StatsInputError on a non-finite t or δ, or df ≤ 0.
 * @example noncentralTCdf(2, 10, 1) // 0.80761… (R: pt(2, 10, 1))
 */
export function noncentralTCdf(t: number, df: number, delta: number): number {
  assertFiniteNumber(t, "t");
  assertDf(df);
  assertFiniteNumber(delta, "delta");
  return as243Applies(df, delta) ? as243(t, df, delta) : byIntegration(t, df, delta, logURange(df));
}

/**
 * Quantile function of the noncentral t distribution: the t with P(T ≤ t) = p, found by
 * Brent's root finder on {@link noncentralTCdf}, from a bracket grown around the normal
 * approximation δ + z_p·√(1 + δ²/(2ν)). Located to about 1e−13 relative.
 * @see Lenth RV. Algorithm AS 243. Appl Stat 1989;38:185–189; Brent RP. Algorithms for
 *   Minimization without Derivatives, 1973, ch. 4.
 * Complexity: about 10–15 CDF evaluations.
 * Throws StatsInputError when p is not strictly between 0 and 1, df ≤ 0, or δ is not finite.
 * @example noncentralTQuantile(0.95, 19, 1.959964 * Math.sqrt(20)) / Math.sqrt(20) // 2.8095…
 */
export function noncentralTQuantile(p: number, df: number, delta: number): number {
  assertOpenProbability(p);
  assertDf(df);
  assertFiniteNumber(delta, "delta");
  let cdf: (t: number) => number;
  if (as243Applies(df, delta)) {
    cdf = (t) => as243(t, df, delta);
  } else {
    const range = logURange(df);
    cdf = (t) => byIntegration(t, df, delta, range);
  }
  const sd = Math.sqrt(1 + (delta * delta) / (2 * df));
  const guess = delta + normal.quantile(p, 0, 1) * sd;
  let lo = guess - sd;
  let hi = guess + sd;
  let flo = cdf(lo) - p;
  let fhi = cdf(hi) - p;
  for (let step = sd, k = 0; flo > 0; step *= 2, k++) {
    if (k > 200) throw new StatsInputError(`no quantile found for p = ${p}, df = ${df}, delta = ${delta}`);
    hi = lo;
    fhi = flo;
    lo -= step;
    flo = cdf(lo) - p;
  }
  for (let step = sd, k = 0; fhi < 0; step *= 2, k++) {
    if (k > 200) throw new StatsInputError(`no quantile found for p = ${p}, df = ${df}, delta = ${delta}`);
    lo = hi;
    flo = fhi;
    hi += step;
    fhi = cdf(hi) - p;
  }
  if (flo === 0) return lo;
  if (fhi === 0) return hi;
  return brentRoot((t) => cdf(t) - p, lo, hi, 1e-13 * Math.max(1, Math.abs(guess))).x;
}
