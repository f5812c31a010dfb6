/**
 * One-dimensional root finding without derivatives.
 */
import { assertFiniteNumber, StatsInputError } from "./validate";

export interface BrentRootResult {
  /** The abscissa found: within 2·ε·|x| + tol of a sign change of f. */
  x: number;
  /** f(x). */
  fx: number;
  /** Function evaluations used. */
  evaluations: number;
}

/**
 * Brent's method for a zero of f on a bracket [a, b] where f changes sign: inverse quadratic
 * interpolation and secant steps, safeguarded by bisection, so it never does worse than
 * bisection and usually converges superlinearly.
 * @see Brent RP. Algorithms for Minimization without Derivatives. Prentice-Hall, 1973, ch. 4
 *   (procedure "zero").
 * Complexity: at most about (log2((b − a)/tol))² evaluations of f, usually far fewer than
 *   bisection's log2((b − a)/tol).
 * Throws StatsInputError when a or b is not finite, a = b, tol ≤ 0, f(a) and f(b) have the
 *   same sign (no bracket), or the evaluations run out.
 * @example brentRoot((x) => x * x - 2, 0, 2).x // 1.41421356…
 */
export function brentRoot(
  f: (x: number) => number,
  a: number,
  b: number,
  tol = 1e-12,
  maxEvaluations = 500,
): BrentRootResult {
  assertFiniteNumber(a, "a");
  assertFiniteNumber(b, "b");
  if (a === b) throw new StatsInputError("the bracket needs two different ends");
  if (!(tol > 0)) throw new StatsInputError(`tol must be positive (got ${tol})`);
  let fa = f(a);
  let fb = f(b);
  let evaluations = 2;
  if (fa === 0) return { x: a, fx: fa, evaluations };
  if (fb === 0) return { x: b, fx: fb, evaluations };
  if (!(fa < 0 !== fb < 0) || Number.isNaN(fa) || Number.isNaN(fb)) {
    throw new StatsInputError(`[${a}, ${b}] does not bracket a root: f(a) = ${fa}, f(b) = ${fb}`);
  }
  // b is the best estimate so far, a the previous one, and c the point that keeps the sign
  // change between b and c.
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  for (;;) {
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + tol;
    const m = 0.5 * (c - b);
    if (Math.abs(m) <= tol1 || fb === 0) return { x: b, fx: fb, evaluations };
    if (evaluations >= maxEvaluations) {
      throw new StatsInputError(`no root found to ${tol} within ${maxEvaluations} evaluations`);
    }
    if (Math.abs(e) < tol1 || Math.abs(fa) <= Math.abs(fb)) {
      d = m;
      e = m;
    } else {
      let s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        // Two points only: secant step.
        p = 2 * m * s;
        q = 1 - s;
      } else {
        // Inverse quadratic interpolation through a, b and c.
        q = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * q * (q - r) - (b - a) * (r - 1));
        q = (q - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      s = e;
      e = d;
      // Accept the interpolation only if it falls well inside the bracket and shrinks faster
      // than the step before last; otherwise bisect.
      if (2 * p < 3 * m * q - Math.abs(tol1 * q) && p < Math.abs(0.5 * s * q)) {
        d = p / q;
      } else {
        d = m;
        e = m;
      }
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol1 ? d : m > 0 ? tol1 : -tol1;
    fb = f(b);
    evaluations++;
    if (fb < 0 === fc < 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
  }
}
