/**
 * What the indirect study's chart draws: the histogram of all values with the fitted
 * non-diseased distribution scaled by its fraction, the truncation interval and the limits.
 */
import normal from "@stdlib/stats-base-dists-normal";
import type { IndirectCells } from "./indirect-cells";
import { powerNormalScale, type PowerNormal } from "./power-normal";

export interface IndirectHistogramBin {
  /** Cell edges on the raw scale; an open cell has lower 0 or upper null (+∞). */
  lower: number;
  upper: number | null;
  /** Values in the cell, censored ones included in the open cells. */
  count: number;
  /** Values the fitted non-diseased part puts there: N · fraction · P(lower ≤ X < upper). */
  expectedNonDiseased: number;
  /** True for the open cells of censored values. */
  open: boolean;
}

/**
 * The chart's bins: every cell with its count and the non-diseased count the fit expects,
 * N·f·(F(upper) − F(lower)) with F the fitted power-normal and f the non-diseased fraction, so
 * that the excess of the observed over the expected is the diseased part (Arzideh et al. 2007:
 * D_d = D_mix − D_nd).
 * @see Arzideh F et al. Clin Chem Lab Med 2007;45:1043–1057; J Lab Med 2009;33:52–66.
 * Complexity O(K) for K cells. Throws nothing (σ must be positive, as any fit gives).
 * @example indirectHistogram(indirectCells(values), estimate, estimate.fraction)[0].expectedNonDiseased
 */
export function indirectHistogram(cells: IndirectCells, fit: PowerNormal, fraction: number): IndirectHistogramBin[] {
  const F = (x: number) => normal.cdf(powerNormalScale(x, fit.lambda), fit.mu, fit.sigma);
  const bins: IndirectHistogramBin[] = [];
  const K = cells.counts.length;
  for (let j = 0; j < K; j++) {
    const lower = cells.edges[j];
    const upper = cells.edges[j + 1];
    bins.push({
      lower,
      upper: Number.isFinite(upper) ? upper : null,
      count: cells.counts[j],
      expectedNonDiseased: cells.n * fraction * Math.max(0, F(upper) - F(lower)),
      open: lower === 0 || !Number.isFinite(upper),
    });
  }
  return bins;
}
