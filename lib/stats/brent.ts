/**
 * One-dimensional maximisation without derivatives.
 */
import { assertFiniteNumber, StatsInputError } from "./validate";

export interface BrentResult {
  /** The abscissa of the maximum found. */
  x: number;
  /** The function value there. */
  fx: number;
  /** Function evaluations used. */
  evaluations: number;
}

const GOLDEN = 0.5 * (3 - Math.sqrt(5));
const SQRT_EPS = Math.sqrt(Number.EPSILON);

/**
 * Brent's method for the maximum of a unimodal function on [a, b]: golden-section steps
 * safeguarding successive parabolic interpolation. The abscissa is located to within about
 * 3·(√ε·|x| + tol).
 * @see Brent RP. Algorithms for Minimization without Derivatives. Prentice-Hall, 1973, ch. 5.
 * Complexity: O(log((b − a)/tol)) evaluations of f, usually far fewer thanks to the parabolic
 *   steps.
 * Throws StatsInputError when a or b is not finite, a ≥ b, or tol ≤ 0.
 * @example brentMaximize((x) => -(x - 1) * (x - 1), -3, 3).x // ≈ 1
 */
export function brentMaximize(
  f: (x: number) => number,
  a: number,
  b: number,
  tol = 1e-9,
  maxEvaluations = 200,
): BrentResult {
  assertFiniteNumber(a, "a");
  assertFiniteNumber(b, "b");
  if (!(a < b)) throw new StatsInputError(`the search interval needs a < b (got [${a}, ${b}])`);
  if (!(tol > 0)) throw new StatsInputError(`tol must be positive (got ${tol})`);
  // Work on g = −f so the classic minimisation steps read as published.
  const g = (x: number) => -f(x);
  let x = a + GOLDEN * (b - a);
  let w = x;
  let v = x;
  let fx = g(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  let evaluations = 1;
  while (evaluations < maxEvaluations) {
    const m = 0.5 * (a + b);
    const tol1 = SQRT_EPS * Math.abs(x) + tol;
    const tol2 = 2 * tol1;
    if (Math.abs(x - m) <= tol2 - 0.5 * (b - a)) break;
    let useGolden = true;
    if (Math.abs(e) > tol1) {
      let r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      r = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * r) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = x < m ? tol1 : -tol1;
        useGolden = false;
      }
    }
    if (useGolden) {
      e = (x < m ? b : a) - x;
      d = GOLDEN * e;
    }
    const u = x + (Math.abs(d) >= tol1 ? d : d > 0 ? tol1 : -tol1);
    const fu = g(u);
    evaluations++;
    if (fu <= fx) {
      if (u < x) b = x;
      else a = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  return { x, fx: -fx, evaluations };
}
