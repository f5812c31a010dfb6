/**
 * The histogram that the indirect methods work on: routine results binned at a multiple of
 * their reporting resolution, with censored results in open cells at the ends.
 */
import type { CensoredValue } from "./estimate";
import { valueAtRank } from "./quantile";
import { StatsInputError } from "./validate";

/** One routine result: a measured number, or a censored value such as "<0.5". */
export type RoutineValue = number | CensoredValue;

export interface IndirectCells {
  /**
   * Cell edges e₀ < e₁ < … < e_K on the raw scale. Cell j holds the values in [e_j, e_{j+1}).
   * With censored values below, e₀ is 0 and cell 0 is the open cell (0, e₁); with censored values
   * above (or values beyond the last regular edge), e_K is +Infinity.
   */
  edges: Float64Array;
  /** Values per cell (K of them). */
  counts: Float64Array;
  /** The cell of each input value, in input order (for resampling). */
  cellOf: Int32Array;
  /** All values, censored ones included. */
  n: number;
  /** The reporting resolution found in the measured values (null when they look continuous). */
  resolution: number | null;
  /** Width of the regular cells. */
  binWidth: number;
  /** Index of the first and one past the last regular (closed, equal-width) cell. */
  regular: [number, number];
  censoredBelow: { count: number; limit: number } | null;
  censoredAbove: { count: number; limit: number } | null;
  /** Measured values that lay beyond the regular cells and were counted in an open end cell. */
  foldedIntoOpenCells: number;
}

/** Cells wider than this many would not help the fit; values beyond go to the open top cell. */
const MAX_CELLS = 4000;

/**
 * The reporting resolution of measured values: the smallest gap between distinct values, when
 * ties are common (fewer distinct values than half the values) and at least 99% of the gaps are
 * whole multiples of it; otherwise null.
 * @see common practice (laboratory results are reported at a fixed number of decimals)
 * Complexity O(n) on sorted values. Throws nothing.
 * @example reportingResolution(Float64Array.of(1, 1, 2, 2, 4, 4)) // 1
 */
export function reportingResolution(sorted: Float64Array): number | null {
  const len = sorted.length;
  let distinct = len > 0 ? 1 : 0;
  let minGap = Number.POSITIVE_INFINITY;
  for (let i = 1; i < len; i++) {
    if (sorted[i] !== sorted[i - 1]) {
      distinct++;
      minGap = Math.min(minGap, sorted[i] - sorted[i - 1]);
    }
  }
  if (distinct < 3 || distinct > len / 2 || !Number.isFinite(minGap)) return null;
  // Rounded to 12 significant digits, so that 0.30000000000000004 − 0.2 reads as 0.1.
  const r = Number(minGap.toPrecision(12));
  let whole = 0;
  let gaps = 0;
  for (let i = 1; i < len; i++) {
    if (sorted[i] === sorted[i - 1]) continue;
    gaps++;
    const k = (sorted[i] - sorted[i - 1]) / r;
    if (Math.abs(k - Math.round(k)) < 1e-6 * Math.max(1, k)) whole++;
  }
  return whole >= 0.99 * gaps ? r : null;
}

/**
 * Bins routine results for the indirect methods.
 *
 * Bin width: the Freedman–Diaconis width 2·IQR·n^(−1/3) of the measured values, but never
 * narrower than IQR/12 (our stated choice: finer cells add nothing to a three-parameter fit and
 * cost time; a binned likelihood loses well under 1% of the information of the exact one at
 * widths below σ/4), rounded up to a whole multiple of the reporting resolution. With a
 * resolution r the edges lie half-way between reportable values (a reported 4.5 at r = 0.1
 * stands for [4.45, 4.55)), so ties from rounding fall inside one cell and the likelihood of a
 * cell is exactly the probability of the values that round into it.
 *
 * Censored values are kept, never dropped: those below a limit of quantitation ("<L") fill the
 * open cell (0, L), L the highest such limit; a measured value below L is counted there too.
 * Those above ("> U", U the lowest such limit) fill the open cell (U, ∞); the regular cells
 * are cut at L and U, so the first and last may be narrower than the rest. The likelihood of
 * an open cell is a cumulative probability. Without censoring above, measured values beyond
 * 4,000 regular cells also go to an open top cell (counted in `foldedIntoOpenCells`).
 * @see Freedman D, Diaconis P. Z Wahrscheinlichkeitstheorie verw Gebiete 1981;57:453–476;
 *   Arzideh F et al. J Lab Med 2009;33:52–66 (a binned, truncated likelihood).
 * Complexity O(n log n) for the sort, O(n + K) otherwise.
 * Throws StatsInputError for fewer than 20 measured values, a measured value ≤ 0 or not finite,
 *   a censored value with a limit ≤ 0, or measured values that are all equal.
 * @example indirectCells([1, 2, 2, 3, { value: 1, side: "below" }]) // throws: too few values
 */
export function indirectCells(values: readonly RoutineValue[]): IndirectCells {
  if (!Array.isArray(values)) throw new StatsInputError("values must be an array");
  const n = values.length;
  const measured: number[] = [];
  let belowLimit = Number.NEGATIVE_INFINITY;
  let belowCount = 0;
  let aboveLimit = Number.POSITIVE_INFINITY;
  let aboveCount = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (typeof v === "number") {
      if (!Number.isFinite(v)) throw new StatsInputError(`values[${i}] is not a finite number (${String(v)})`);
      if (v <= 0) {
        throw new StatsInputError(
          `values[${i}] = ${v} is not positive; the power-normal model of the indirect method needs values > 0 (report values below the limit of quantitation as "<L")`,
        );
      }
      measured.push(v);
    } else if (v !== null && typeof v === "object" && (v.side === "below" || v.side === "above") && Number.isFinite(v.value)) {
      if (v.value <= 0) throw new StatsInputError(`values[${i}] is censored at ${v.value}; a censoring limit must be positive`);
      if (v.side === "below") {
        belowCount++;
        belowLimit = Math.max(belowLimit, v.value);
      } else {
        aboveCount++;
        aboveLimit = Math.min(aboveLimit, v.value);
      }
    } else {
      throw new StatsInputError(`values[${i}] must be a number or a censored value { value, side } (got ${JSON.stringify(v)})`);
    }
  }
  if (measured.length < 20) {
    throw new StatsInputError(`the indirect method needs at least 20 measured values (got ${measured.length})`);
  }
  const sorted = Float64Array.from(measured).sort();
  const m = sorted.length;
  const min = sorted[0];
  const max = sorted[m - 1];
  if (!(max > min)) throw new StatsInputError("the measured values are all equal; there is no distribution to fit");
  const resolution = reportingResolution(sorted);
  const q = (p: number) => valueAtRank(sorted, 1 + p * (m - 1)) as number;
  let iqr = q(0.75) - q(0.25);
  if (!(iqr > 0)) iqr = (max - min) / 4;
  let width = Math.max(2 * iqr * Math.cbrt(1 / m), iqr / 12);
  const half = resolution === null ? 0 : resolution / 2;
  if (resolution !== null) width = Math.max(1, Math.ceil(width / resolution - 1e-9)) * resolution;

  // The regular cells: an aligned grid base + j·width (base half a step below the smallest
  // value, so edges fall half-way between reportable values), cut at the censoring limits.
  const base = min - half;
  const lowStart = belowCount > 0 ? belowLimit : base;
  const tiny = 1e-9 * width;
  const regularEdges: number[] = [lowStart];
  let j = Math.floor((lowStart - base) / width) + 1;
  let capped = false;
  for (;;) {
    const e = Number((base + j * width).toPrecision(12));
    j++;
    if (aboveCount > 0 ? e >= aboveLimit - tiny : regularEdges[regularEdges.length - 1] > max) break;
    if (e <= regularEdges[regularEdges.length - 1] + tiny) continue;
    if (regularEdges.length > MAX_CELLS) {
      capped = true;
      break;
    }
    regularEdges.push(e);
  }
  if (aboveCount > 0 && aboveLimit > regularEdges[regularEdges.length - 1] + tiny) regularEdges.push(aboveLimit);
  if (regularEdges.length < 2) throw new StatsInputError("the censoring limits leave no room for measured values");
  const k = regularEdges.length - 1;
  const top = regularEdges[k];

  // Edges rounded to 12 significant digits, so that 4.35 does not print as 4.3500000000000005.
  const lowOpen = belowCount > 0 ? 1 : 0;
  const highOpen = aboveCount > 0 || capped || max > top ? 1 : 0;
  const K = lowOpen + k + highOpen;
  const edges = new Float64Array(K + 1);
  if (lowOpen) edges[0] = 0;
  for (let r = 0; r <= k; r++) edges[lowOpen + r] = regularEdges[r];
  if (highOpen) edges[K] = Number.POSITIVE_INFINITY;
  const counts = new Float64Array(K);
  const cellOf = new Int32Array(n);
  let folded = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    let c: number;
    if (typeof v === "number") {
      if (v < lowStart) {
        // Below the highest "<L": counted with the censored values (lowOpen is 1 here).
        c = 0;
        folded++;
      } else if (v > top || (v === top && aboveCount === 0)) {
        c = K - 1;
        folded++;
      } else {
        // Binary search for the regular cell [e_r, e_{r+1}) holding v (the last one closed at a limit).
        let lo = lowOpen;
        let hi = lowOpen + k - 1;
        while (lo < hi) {
          const mid = (lo + hi + 1) >> 1;
          if (edges[mid] <= v) lo = mid;
          else hi = mid - 1;
        }
        c = lo;
      }
    } else {
      c = v.side === "below" ? 0 : K - 1;
    }
    cellOf[i] = c;
    counts[c]++;
  }
  return {
    edges,
    counts,
    cellOf,
    n,
    resolution,
    binWidth: width,
    regular: [lowOpen, lowOpen + k],
    censoredBelow: belowCount > 0 ? { count: belowCount, limit: belowLimit } : null,
    censoredAbove: aboveCount > 0 ? { count: aboveCount, limit: aboveLimit } : null,
    foldedIntoOpenCells: folded,
  };
}
