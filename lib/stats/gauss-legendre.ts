/**
 * Gauss-Legendre quadrature: an m-point rule exact for polynomials of degree 2m − 1, applied
 * on consecutive panels.
 */
import { StatsInputError } from "./validate";

export interface QuadratureRule {
  /** Nodes on [−1, 1], ascending. */
  nodes: Float64Array;
  weights: Float64Array;
}

/**
 * The m-point Gauss-Legendre rule on [−1, 1]: the nodes are the zeros of the Legendre
 * polynomial P_m, found by Newton's method from Tricomi's starting values
 * cos(π(i − 1/4)/(m + 1/2)), with P_m and P_m' from the three-term recurrence; the weights are
 * 2/((1 − x²)·P_m'(x)²).
 * @see Abramowitz M, Stegun IA. Handbook of Mathematical Functions, 1964, 25.4.29 and
 *   Table 25.4; Davis PJ, Rabinowitz P. Methods of Numerical Integration, 2nd ed., 1984, §2.7.
 * Complexity O(m²).
 * Throws StatsInputError when m is not an integer from 1 to 100.
 * @example gaussLegendreRule(2).nodes // [−0.57735…, 0.57735…]
 */
export function gaussLegendreRule(m: number): QuadratureRule {
  if (!Number.isInteger(m) || m < 1 || m > 100) {
    throw new StatsInputError(`the number of points must be an integer from 1 to 100 (got ${m})`);
  }
  const nodes = new Float64Array(m);
  const weights = new Float64Array(m);
  const half = Math.floor((m + 1) / 2);
  for (let i = 1; i <= half; i++) {
    let x = Math.cos((Math.PI * (i - 0.25)) / (m + 0.5));
    let dp = 0;
    for (let iter = 0; iter < 100; iter++) {
      let p0 = 1;
      let p1 = x;
      for (let k = 1; k < m; k++) {
        const p2 = ((2 * k + 1) * x * p1 - k * p0) / (k + 1);
        p0 = p1;
        p1 = p2;
      }
      // p1 = P_m(x), p0 = P_{m−1}(x)
      dp = m === 1 ? 1 : (m * (x * p1 - p0)) / (x * x - 1);
      const step = p1 / dp;
      x -= step;
      if (Math.abs(step) <= 1e-16) break;
    }
    const w = 2 / ((1 - x * x) * dp * dp);
    nodes[i - 1] = -x;
    nodes[m - i] = x;
    weights[i - 1] = w;
    weights[m - i] = w;
  }
  if (m % 2 === 1) nodes[half - 1] = 0;
  return { nodes, weights };
}

/**
 * ∫ f over [breaks[0], breaks[last]], the rule applied on each panel [breaks[j], breaks[j + 1]].
 * @see Abramowitz M, Stegun IA. Handbook of Mathematical Functions, 1964, 25.4.29.
 * Complexity O(m·panels) evaluations of f.
 * Throws StatsInputError on fewer than two breakpoints or breakpoints that are not increasing.
 * @example integrateGaussLegendre(Math.exp, [0, 1], gaussLegendreRule(8)) // 1.71828…
 */
export function integrateGaussLegendre(
  f: (x: number) => number,
  breaks: ArrayLike<number>,
  rule: QuadratureRule,
): number {
  if (breaks.length < 2) throw new StatsInputError("integration needs at least two breakpoints");
  for (let j = 1; j < breaks.length; j++) {
    if (!(breaks[j] > breaks[j - 1])) throw new StatsInputError("breakpoints must be increasing");
  }
  const { nodes, weights } = rule;
  let total = 0;
  for (let j = 0; j + 1 < breaks.length; j++) {
    const mid = 0.5 * (breaks[j] + breaks[j + 1]);
    const halfWidth = 0.5 * (breaks[j + 1] - breaks[j]);
    let s = 0;
    for (let i = 0; i < nodes.length; i++) s += weights[i] * f(mid + halfWidth * nodes[i]);
    total += halfWidth * s;
  }
  return total;
}
