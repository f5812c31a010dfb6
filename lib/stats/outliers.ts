/**
 * The shape shared by Bellwether's outlier screens. A screen proposes; the scientist decides.
 * No screen removes or reorders the caller's data.
 */
export type OutlierMethod = "dixon" | "tukey" | "horn";

export type OutlierSide = "low" | "high";

/** Dixon/Reed: the gap D to the neighbouring value over the range R of the values in play. */
export interface DixonEvidence {
  rule: "dixon";
  side: OutlierSide;
  /** "block": the value was tested together with its neighbour as a pair. */
  kind: "single" | "block";
  gap: number;
  range: number;
  /** D/R, compared with `threshold` (1/3). */
  ratio: number;
  threshold: number;
  /** The 1-based test (of DixonResult.steps) that proposed the value. */
  step: number;
}

/** Tukey: the value against the fences Q1 − k·IQR and Q3 + k·IQR on the raw scale. */
export interface TukeyEvidence {
  rule: "tukey";
  side: OutlierSide;
  value: number;
  q1: number;
  q3: number;
  k: number;
  lowerFence: number;
  upperFence: number;
}

/** Horn: the Box-Cox value (with that round's λ) against the fences on the Box-Cox scale. */
export interface HornEvidence {
  rule: "horn";
  side: OutlierSide;
  lambda: number;
  transformedValue: number;
  q1: number;
  q3: number;
  k: number;
  lowerFence: number;
  upperFence: number;
  /** The 1-based round of the iterated screen that proposed the value. */
  round: number;
}

export type OutlierEvidence = DixonEvidence | TukeyEvidence | HornEvidence;

export interface OutlierProposal {
  /** Position of the value in the caller's array. */
  index: number;
  value: number;
  method: OutlierMethod;
  /** Why it was proposed, in words a scientist can check by hand. */
  reason: string;
  /** The rule's statistic for this value, as numbers. */
  evidence: OutlierEvidence;
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
