import { describe, expect, it } from "vitest";
import { choleskyInPlace, choleskyInverse, choleskySolveInPlace } from "@/lib/stats/cholesky";

// A symmetric positive-definite tridiagonal matrix (diagonally dominant) and a right-hand side.
const A = [4, 2, 0, 0, 2, 5, 2, 0, 0, 2, 5, 2, 0, 0, 2, 5];
const B = [1, 2, 3, 4];

function times(a: number[], x: ArrayLike<number>, k: number): number[] {
  return Array.from({ length: k }, (_, i) => a.slice(i * k, i * k + k).reduce((s, v, j) => s + v * x[j], 0));
}

describe("Cholesky factorisation", () => {
  it("solves A·x = b: A times the answer gives b back", () => {
    for (const bandwidth of [3, 1]) {
      const f = Float64Array.from(A);
      expect(choleskyInPlace(f, 4, bandwidth)).toBe(true);
      const x = Float64Array.from(B);
      choleskySolveInPlace(f, 4, x, bandwidth);
      times(A, x, 4).forEach((v, i) => expect(v).toBeCloseTo(B[i], 12));
    }
    // Golub & Van Loan: the factor of [[4, 2], [2, 5]] is [[2, 0], [1, 2]].
    const f = Float64Array.of(4, 2, 2, 5);
    choleskyInPlace(f, 2);
    expect([f[0], f[2], f[3]]).toEqual([2, 1, 2]);
  });

  it("inverts: A·A⁻¹ = I", () => {
    const f = Float64Array.from(A);
    choleskyInPlace(f, 4, 1);
    const inv = choleskyInverse(f, 4, 1);
    for (let j = 0; j < 4; j++) {
      const col = Array.from({ length: 4 }, (_, i) => inv[i * 4 + j]);
      times(A, col, 4).forEach((v, i) => expect(v).toBeCloseTo(i === j ? 1 : 0, 12));
    }
  });

  it("reports a matrix that is not positive definite", () => {
    expect(choleskyInPlace(Float64Array.of(1, 2, 2, 1), 2)).toBe(false); // eigenvalues 3 and −1
  });
});
