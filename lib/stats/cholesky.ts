/**
 * Dense Cholesky factorisation of a small symmetric positive-definite matrix (row-major), with
 * the solve and the inverse built on it. For the few-dozen-parameter systems of the penalised
 * fits (the LMS curves); no pivoting, as positive definiteness makes it stable.
 */

/**
 * Factorises A = R·Rᵀ in place (R lower triangular, written over A's lower triangle; the upper
 * triangle is left as it was). Returns false, leaving A partly overwritten, when A is not
 * numerically positive definite.
 * @see Golub GH, Van Loan CF. Matrix Computations, 4th ed. 2013, algorithm 4.2.1.
 * Complexity O(k³/3) for a k × k matrix, O(k·b²) banded. Throws nothing.
 * @example choleskyInPlace(Float64Array.of(4, 2, 2, 5), 2) // true; lower triangle [2, ·, 1, 2]
 */
export function choleskyInPlace(a: Float64Array, k: number, bandwidth = k - 1): boolean {
  for (let j = 0; j < k; j++) {
    const rj = j * k;
    const from = Math.max(0, j - bandwidth);
    let d = a[rj + j];
    for (let p = from; p < j; p++) d -= a[rj + p] * a[rj + p];
    if (!(d > 0) || !Number.isFinite(d)) return false;
    const djj = Math.sqrt(d);
    a[rj + j] = djj;
    const last = Math.min(k - 1, j + bandwidth);
    for (let i = j + 1; i <= last; i++) {
      const ri = i * k;
      let s = a[ri + j];
      for (let p = Math.max(from, i - bandwidth); p < j; p++) s -= a[ri + p] * a[rj + p];
      a[ri + j] = s / djj;
    }
  }
  return true;
}

/**
 * Solves (R·Rᵀ)·x = b with the factor from {@link choleskyInPlace}; b is overwritten by x.
 * @see Golub GH, Van Loan CF. Matrix Computations, 4th ed. 2013, section 4.2.
 * Complexity O(k²). Throws nothing.
 * @example choleskySolveInPlace(factor, k, rhs) // rhs now holds the solution
 */
export function choleskySolveInPlace(r: Float64Array, k: number, b: Float64Array, bandwidth = k - 1): void {
  for (let i = 0; i < k; i++) {
    const ri = i * k;
    let s = b[i];
    for (let p = Math.max(0, i - bandwidth); p < i; p++) s -= r[ri + p] * b[p];
    b[i] = s / r[ri + i];
  }
  for (let i = k - 1; i >= 0; i--) {
    let s = b[i];
    const last = Math.min(k - 1, i + bandwidth);
    for (let p = i + 1; p <= last; p++) s -= r[p * k + i] * b[p];
    b[i] = s / r[i * k + i];
  }
}

/**
 * The inverse of R·Rᵀ from its factor, as a dense row-major matrix.
 * @see Golub GH, Van Loan CF. Matrix Computations, 4th ed. 2013, section 4.2.
 * Complexity O(k³). Throws nothing.
 * @example choleskyInverse(factor, k) // (R·Rᵀ)⁻¹
 */
export function choleskyInverse(r: Float64Array, k: number, bandwidth = k - 1): Float64Array {
  const inv = new Float64Array(k * k);
  const col = new Float64Array(k);
  for (let j = 0; j < k; j++) {
    col.fill(0);
    col[j] = 1;
    choleskySolveInPlace(r, k, col, bandwidth);
    for (let i = 0; i < k; i++) inv[i * k + j] = col[i];
  }
  return inv;
}
