/**
 * Multidimensional minimisation without derivatives.
 */
import { StatsInputError } from "./validate";

export interface NelderMeadResult {
  /** The best point found. */
  x: number[];
  /** The function value there. */
  fx: number;
  /** Function evaluations used. */
  evaluations: number;
  /** True when the simplex shrank below the tolerance before the evaluation budget ran out. */
  converged: boolean;
}

export interface NelderMeadOptions {
  /** Initial step along each coordinate (default 0.1 for every coordinate). */
  steps?: readonly number[];
  /** Stop when the function values of the simplex span less than this (default 1e-9). */
  tolerance?: number;
  /** Evaluation budget (default 400). */
  maxEvaluations?: number;
}

/**
 * Nelder–Mead simplex minimisation with the standard coefficients (reflection 1, expansion 2,
 * contraction ½, shrink ½). A non-finite function value counts as +∞, so a caller may return
 * NaN or Infinity where its function is undefined.
 * @see Nelder JA, Mead R. A simplex method for function minimization. Comput J 1965;7:308–313;
 *   Lagarias JC, Reeds JA, Wright MH, Wright PE. Convergence properties of the Nelder–Mead
 *   simplex method in low dimensions. SIAM J Optim 1998;9:112–147 (the order of the steps).
 * Complexity: O(d) evaluations per iteration for d coordinates, plus O(d²) bookkeeping.
 * Throws StatsInputError for an empty or non-finite start, or steps of the wrong length.
 * @example nelderMead(([x, y]) => (x - 1) ** 2 + (y + 2) ** 2, [0, 0]).x // ≈ [1, −2]
 */
export function nelderMead(
  f: (x: readonly number[]) => number,
  start: readonly number[],
  options: NelderMeadOptions = {},
): NelderMeadResult {
  const d = start.length;
  if (d === 0 || start.some((v) => !Number.isFinite(v))) {
    throw new StatsInputError("the start point must be a non-empty array of finite numbers");
  }
  const steps = options.steps ?? start.map(() => 0.1);
  if (steps.length !== d) throw new StatsInputError(`steps must have ${d} entries (got ${steps.length})`);
  const tolerance = options.tolerance ?? 1e-9;
  const maxEvaluations = options.maxEvaluations ?? 400;
  let evaluations = 0;
  const g = (x: readonly number[]): number => {
    evaluations++;
    const v = f(x);
    return Number.isFinite(v) ? v : Number.POSITIVE_INFINITY;
  };
  const points: number[][] = [start.slice()];
  for (let i = 0; i < d; i++) {
    const p = start.slice();
    p[i] += steps[i];
    points.push(p);
  }
  const values = points.map(g);
  const order = points.map((_, i) => i);
  let converged = false;
  const at = (centroid: number[], worst: number[], t: number) => centroid.map((c, k) => c + t * (worst[k] - c));
  while (evaluations < maxEvaluations) {
    order.sort((a, b) => values[a] - values[b]);
    const best = order[0];
    const worst = order[d];
    const second = order[d - 1];
    if (Math.abs(values[worst] - values[best]) <= tolerance * (Math.abs(values[best]) + tolerance)) {
      converged = true;
      break;
    }
    const centroid = new Array<number>(d).fill(0);
    for (let j = 0; j < d; j++) {
      const p = points[order[j]];
      for (let k = 0; k < d; k++) centroid[k] += p[k] / d;
    }
    const reflected = at(centroid, points[worst], -1);
    const fr = g(reflected);
    if (fr < values[best]) {
      const expanded = at(centroid, points[worst], -2);
      const fe = g(expanded);
      if (fe < fr) {
        points[worst] = expanded;
        values[worst] = fe;
      } else {
        points[worst] = reflected;
        values[worst] = fr;
      }
      continue;
    }
    if (fr < values[second]) {
      points[worst] = reflected;
      values[worst] = fr;
      continue;
    }
    // Contraction: outside when the reflection improved on the worst, inside otherwise.
    const outside = fr < values[worst];
    const contracted = at(centroid, points[worst], outside ? -0.5 : 0.5);
    const fc = g(contracted);
    if (outside ? fc <= fr : fc < values[worst]) {
      points[worst] = contracted;
      values[worst] = fc;
      continue;
    }
    const bestPoint = points[best];
    for (let j = 0; j <= d; j++) {
      if (j === best) continue;
      points[j] = points[j].map((v, k) => bestPoint[k] + 0.5 * (v - bestPoint[k]));
      values[j] = g(points[j]);
    }
  }
  let bi = 0;
  for (let j = 1; j <= d; j++) if (values[j] < values[bi]) bi = j;
  return { x: points[bi], fx: values[bi], evaluations, converged };
}
