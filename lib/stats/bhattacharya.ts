/**
 * Bhattacharya's graphical resolution of a histogram into Gaussian components, automated for
 * the central (non-diseased) component of routine results.
 */
import { powerNormalScale } from "./power-normal";
import type { IndirectCells } from "./indirect-cells";
import { StatsInputError } from "./validate";

export interface BhattacharyaLine {
  /** Weighted least-squares line D = intercept + slope·b through the points used. */
  slope: number;
  intercept: number;
  /** μ = −intercept/slope and σ = √(−1/slope) of the Gaussian component. */
  mu: number;
  sigma: number;
  /** Points (pairs of neighbouring bins) on the line. */
  points: number;
}

/**
 * The Bhattacharya line through neighbouring bins: for bins with centres y_k and densities f_k
 * (counts per unit width), D_k = (ln f_{k+1} − ln f_k)/(y_{k+1} − y_k) plotted against the
 * boundary b_k = (y_k + y_{k+1})/2 lies on the line D = −(b − μ)/σ² for a Gaussian component.
 * With equal widths h this is METHODS.md §8.3's Δ = ln f_{k+1} − ln f_k = −(h/σ²)(b − μ),
 * divided by h; bins of unequal width (cells mapped through a Box-Cox transform) keep the same
 * line. The fit is weighted least squares with weights 1/(1/c_k + 1/c_{k+1}), the inverse of
 * the approximate variance of ln c_{k+1} − ln c_k for counts c (METHODS.md §8.3: weight by the
 * bin counts). `include(b)` selects the pairs by their boundary.
 * @see Bhattacharya CG. A simple method of resolution of a distribution into Gaussian
 *   components. Biometrics 1967;23:115–135.
 * Complexity O(k). Throws StatsInputError when fewer than 3 pairs are usable or the slope is
 *   not negative.
 * @example bhattacharyaLine([99, 101], [1, 1], [1, 1], () => true) // throws: needs 3 pairs
 */
export function bhattacharyaLine(
  centres: ArrayLike<number>,
  densities: ArrayLike<number>,
  counts: ArrayLike<number>,
  include: (boundary: number) => boolean = () => true,
): BhattacharyaLine {
  let sw = 0;
  let sb = 0;
  let sd = 0;
  let sbb = 0;
  let sbd = 0;
  let points = 0;
  for (let k = 0; k + 1 < centres.length; k++) {
    const c0 = counts[k];
    const c1 = counts[k + 1];
    if (!(c0 > 0 && c1 > 0 && densities[k] > 0 && densities[k + 1] > 0)) continue;
    const b = (centres[k] + centres[k + 1]) / 2;
    if (!include(b)) continue;
    const d = (Math.log(densities[k + 1]) - Math.log(densities[k])) / (centres[k + 1] - centres[k]);
    const w = 1 / (1 / c0 + 1 / c1);
    sw += w;
    sb += w * b;
    sd += w * d;
    sbb += w * b * b;
    sbd += w * b * d;
    points++;
  }
  if (points < 3) throw new StatsInputError(`the Bhattacharya line needs at least 3 pairs of bins (got ${points})`);
  const mb = sb / sw;
  const md = sd / sw;
  const slope = (sbd / sw - mb * md) / (sbb / sw - mb * mb);
  const intercept = md - slope * mb;
  if (!(slope < 0)) throw new StatsInputError("the Bhattacharya line does not fall: no Gaussian component was found");
  return { slope, intercept, mu: -intercept / slope, sigma: Math.sqrt(-1 / slope), points };
}

export interface BhattacharyaResult {
  method: "bhattacharya";
  lower: number | null;
  upper: number | null;
  /** Mean and SD of the component on the Box-Cox scale with the given λ. */
  mu: number;
  sigma: number;
  lambda: number;
  points: number;
}

/**
 * Bhattacharya's procedure as a second opinion beside the truncated maximum likelihood: the
 * cells of the routine results are grouped into bins about σ/3 wide on the Box-Cox scale with
 * the given λ (METHODS.md §8.3: h ≈ σ/2 to σ/4; we pass the TML's λ, so that the component is
 * Gaussian on that scale: our stated choice), and the line is fitted through the pairs whose
 * boundary lies within 1.5 SD of the current mean, iterating from the fullest bin and the
 * robust SD (1.4826·MAD) until the selection settles (at most 20 rounds; our stated choice, in
 * place of choosing the straight segment by eye). The limits are μ ± 1.96σ, carried back.
 * Censored values stay in their open cells and only count when their cell is on the line (it
 * never is in practice: open cells are not used).
 * @see Bhattacharya CG. Biometrics 1967;23:115–135; METHODS.md §8.3.
 * Complexity O(K) per round for K cells. Throws StatsInputError when no falling straight
 *   segment is found.
 * @example bhattacharya(indirectCells(values), 0).lower
 */
export function bhattacharya(cells: IndirectCells, lambda: number): BhattacharyaResult {
  const [r0, r1] = cells.regular;
  const ys: number[] = [];
  const cs: number[] = [];
  for (let j = r0; j < r1; j++) {
    ys.push((powerNormalScale(cells.edges[j], lambda) + powerNormalScale(cells.edges[j + 1], lambda)) / 2);
    cs.push(cells.counts[j]);
  }
  // Robust start on the transformed scale: the weighted median and MAD of the cell centres.
  const total = cs.reduce((a, b) => a + b, 0);
  const wq = (vals: number[], weights: number[], p: number) => {
    const idx = vals.map((_, i) => i).sort((a, b) => vals[a] - vals[b]);
    let acc = 0;
    for (const i of idx) {
      acc += weights[i];
      if (acc >= p * total) return vals[i];
    }
    return vals[idx[idx.length - 1]];
  };
  const med = wq(ys, cs, 0.5);
  const mad = wq(ys.map((y) => Math.abs(y - med)), cs, 0.5);
  let sigma = 1.4826 * mad;
  if (!(sigma > 0)) throw new StatsInputError("the values have no spread around their median");
  // Group the cells into bins of about σ/3 on the transformed scale.
  const target = sigma / 3;
  const centres: number[] = [];
  const densities: number[] = [];
  const counts: number[] = [];
  let j = r0;
  while (j < r1) {
    const lo = powerNormalScale(cells.edges[j], lambda);
    let k = j;
    let c = 0;
    while (k < r1 && (k === j || powerNormalScale(cells.edges[k + 1], lambda) - lo <= target)) c += cells.counts[k++];
    const hi = powerNormalScale(cells.edges[k], lambda);
    centres.push((lo + hi) / 2);
    densities.push(c / (hi - lo));
    counts.push(c);
    j = k;
  }
  let fullest = 0;
  for (let k = 1; k < counts.length; k++) if (densities[k] > densities[fullest]) fullest = k;
  let mu = centres[fullest];
  let line: BhattacharyaLine | null = null;
  for (let round = 0; round < 20; round++) {
    const m = mu;
    const s = sigma;
    const next = bhattacharyaLine(centres, densities, counts, (b) => Math.abs(b - m) <= 1.5 * s);
    const settled = line !== null && Math.abs(next.mu - mu) < 1e-9 * (1 + Math.abs(mu)) && Math.abs(next.sigma - sigma) < 1e-9 * sigma;
    line = next;
    mu = next.mu;
    sigma = next.sigma;
    if (settled) break;
  }
  const back = (y: number) => {
    if (lambda === 0) return Math.exp(y);
    const base = 1 + lambda * y;
    return base > 0 ? Math.exp(Math.log1p(lambda * y) / lambda) : null;
  };
  return {
    method: "bhattacharya",
    lower: back(mu - 1.959963984540054 * sigma),
    upper: back(mu + 1.959963984540054 * sigma),
    mu,
    sigma,
    lambda,
    points: line?.points ?? 0,
  };
}
