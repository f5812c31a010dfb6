/**
 * Cubic B-splines on equally spaced knots over [0, 1] (J intervals, J + 3 basis functions), and
 * the roughness penalty ∫₀¹ f''(τ)² dτ as a matrix. The LMS curves are built from these.
 */
import { StatsInputError } from "./validate";

/** Where τ falls: the interval's index j (the basis functions j … j + 3 are non-zero) and the weights. */
export interface BsplineRow {
  index: number;
  w0: number;
  w1: number;
  w2: number;
  w3: number;
}

/**
 * The four non-zero uniform cubic B-spline weights at τ ∈ [0, 1] on J equal intervals:
 * with u the position inside interval j, (1−u)³/6, (3u³ − 6u² + 4)/6, (−3u³ + 3u² + 3u + 1)/6,
 * u³/6. τ = 1 belongs to the last interval (u = 1). τ outside [0, 1] is extrapolated with the
 * end interval's cubic; callers keep τ inside.
 * @see de Boor C. A Practical Guide to Splines. Springer, 1978 (uniform B-splines); Eilers PHC,
 *   Marx BD. Flexible smoothing with B-splines and penalties. Stat Sci 1996;11:89–121.
 * Complexity O(1). Throws nothing.
 * @example bsplineRow(0.5, 2) // { index: 1, w0: 1/6, w1: 2/3, w2: 1/6, w3: 0 }
 */
export function bsplineRow(tau: number, intervals: number): BsplineRow {
  const x = tau * intervals;
  const index = Math.min(intervals - 1, Math.max(0, Math.floor(x)));
  const u = x - index;
  const v = 1 - u;
  const u2 = u * u;
  const u3 = u2 * u;
  return {
    index,
    w0: (v * v * v) / 6,
    w1: (3 * u3 - 6 * u2 + 4) / 6,
    w2: (-3 * u3 + 3 * u2 + 3 * u + 1) / 6,
    w3: u3 / 6,
  };
}

/** Σ cₖ Bₖ(τ) for coefficients c (length J + 3). */
export function bsplineValue(coefficients: ArrayLike<number>, row: BsplineRow): number {
  const j = row.index;
  return (
    row.w0 * coefficients[j] +
    row.w1 * coefficients[j + 1] +
    row.w2 * coefficients[j + 2] +
    row.w3 * coefficients[j + 3]
  );
}

/**
 * The roughness penalty Ω with cᵀΩc = ∫₀¹ f''(τ)² dτ for f = Σ cₖBₖ on J equal intervals
 * (width h = 1/J), exact: f'' is linear on each interval, so each entry is a sum of integrals
 * of products of two linear functions. Returned as a dense (J + 3)² row-major array.
 * @see Green PJ, Silverman BW. Nonparametric Regression and Generalized Linear Models. Chapman
 *   & Hall, 1994 (the penalty); Cole TJ, Green PJ. Stat Med 1992;11:1305–1319.
 * Complexity O(J). Throws StatsInputError when J is not an integer ≥ 1.
 * @example roughnessPenalty(1) // 4 × 4; a straight line (c = [0, 1, 2, 3]) has penalty 0
 */
export function roughnessPenalty(intervals: number): Float64Array {
  if (!Number.isInteger(intervals) || intervals < 1) {
    throw new StatsInputError(`the number of spline intervals must be an integer ≥ 1 (got ${intervals})`);
  }
  const k = intervals + 3;
  const omega = new Float64Array(k * k);
  // Second derivatives in u of the four local weights: a + b·u.
  const a = [1, -2, 1, 0];
  const b = [-1, 3, -3, 1];
  const scale = intervals * intervals * intervals; // (d²/dτ² = J² d²/du²)², dτ = du/J
  for (let j = 0; j < intervals; j++) {
    for (let p = 0; p < 4; p++) {
      for (let q = 0; q < 4; q++) {
        const integral = a[p] * a[q] + (a[p] * b[q] + b[p] * a[q]) / 2 + (b[p] * b[q]) / 3;
        omega[(j + p) * k + (j + q)] += scale * integral;
      }
    }
  }
  return omega;
}

/**
 * cᵀΩc = ∫₀¹ f''(τ)² dτ computed from second differences of the coefficients, without forming
 * Ω: f'' is J²·(c_j − 2c_{j+1} + c_{j+2}) at knot j and linear between knots, so each interval
 * adds (J³/3)·(d_j² + d_j·d_{j+1} + d_{j+1}²). Unlike cᵀ(Ωc), this does not cancel large terms,
 * which matters when a large smoothing parameter multiplies it.
 * @see Green PJ, Silverman BW. Nonparametric Regression and Generalized Linear Models. 1994.
 * `offset` and `stride` address one curve's coefficients inside a longer, interleaved vector.
 * Complexity O(J). Throws nothing.
 * @example roughness([0, 0, 1, 0, 0], 2) // 8 · (1 + 4 + 1 − 2 − 2) / 3 …
 */
export function roughness(c: ArrayLike<number>, intervals: number, offset = 0, stride = 1): number {
  const at = (i: number) => c[offset + i * stride];
  let total = 0;
  let prev = at(0) - 2 * at(1) + at(2);
  for (let j = 0; j < intervals; j++) {
    const next = at(j + 1) - 2 * at(j + 2) + at(j + 3);
    total += prev * prev + prev * next + next * next;
    prev = next;
  }
  return (total * intervals * intervals * intervals) / 3;
}

/**
 * Ωc (the half-gradient of cᵀΩc) from second differences, written into `out` at `offset`, in
 * the same cancellation-free way as {@link roughness}: Ωc = (J³/3)·Dᵀ(Q·d), d = Dc the second
 * differences, Q the tridiagonal form of Σ(d_j² + d_j·d_{j+1} + d_{j+1}²).
 * @see Green PJ, Silverman BW. 1994.
 * Complexity O(J). Throws nothing.
 * @example roughnessGradient(c, 24, out) // out = Ωc
 */
export function roughnessGradient(
  c: ArrayLike<number>,
  intervals: number,
  out: Float64Array,
  offset = 0,
  stride = 1,
): void {
  const at = (i: number) => c[offset + i * stride];
  const nd = intervals + 1;
  const d = new Float64Array(nd);
  for (let i = 0; i < nd; i++) d[i] = at(i) - 2 * at(i + 1) + at(i + 2);
  const scale = (intervals * intervals * intervals) / 3;
  for (let i = 0; i < intervals + 3; i++) out[offset + i * stride] = 0;
  for (let i = 0; i < nd; i++) {
    // (Q·d)_i: d_i² appears in two intervals at an inner knot and in one at either end; each
    // product d_i·d_{i+1} once, so Q has 1/2 beside the diagonal.
    const inner = i > 0 && i < nd - 1 ? 2 : 1;
    const qd = scale * (inner * d[i] + (i > 0 ? d[i - 1] / 2 : 0) + (i < nd - 1 ? d[i + 1] / 2 : 0));
    out[offset + i * stride] += qd;
    out[offset + (i + 1) * stride] -= 2 * qd;
    out[offset + (i + 2) * stride] += qd;
  }
}
