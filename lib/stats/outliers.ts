/**
 * The shape shared by Bellwether's outlier screens. A screen proposes; the scientist decides.
 * No screen removes or reorders the caller's data.
 */
export type OutlierMethod = "dixon" | "tukey" | "horn";

export interface OutlierProposal {
  /** Position of the value in the caller's array. */
  index: number;
  value: number;
  method: OutlierMethod;
  /** Why it was proposed, in words a scientist can check by hand. */
  reason: string;
}

/**
 * Indices of `values` ordered by value (ties by index).
 * @see common practice
 * Complexity O(n log n). Throws nothing.
 * @example orderOf([30, 10, 20]) // Uint32Array [1, 2, 0]
 */
export function orderOf(values: readonly number[]): Uint32Array {
  const idx = new Uint32Array(values.length);
  for (let i = 0; i < idx.length; i++) idx[i] = i;
  return idx.sort((a, b) => values[a] - values[b] || a - b);
}
