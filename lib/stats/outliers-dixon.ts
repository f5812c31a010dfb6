/**
 * Dixon's gap-to-range rule as proposed for reference values by Reed, Henry and Mason.
 */
import { orderOf, type OutlierProposal, type OutlierSide } from "./outliers";
import { assertFiniteSample } from "./validate";

/** Reed et al.'s criterion: an extreme value whose gap is at least a third of the range. */
export const DIXON_REED_RATIO = 1 / 3;

export interface DixonStep {
  side: OutlierSide;
  /** "single": the extreme value alone; "block": the two most extreme values together. */
  kind: "single" | "block";
  /** D/R for this test. */
  ratio: number;
  flagged: boolean;
}

export interface DixonResult {
  outliers: OutlierProposal[];
  /** Every test made, in order, so the decision can be audited. */
  steps: DixonStep[];
}

/**
 * Dixon/Reed D/R rule, iterated: the most extreme value on either side is proposed when the
 * gap D to its neighbour is at least 1/3 of the range R of the values still in play; it is set
 * aside and the test repeated. When neither single value qualifies, the two most extreme
 * values on each side are tested as a block (D = gap between the pair and the next value), so
 * that a pair of similar outliers cannot mask each other. Stops when nothing qualifies or
 * fewer than 3 values remain (4 for a block).
 * @see Dixon WJ. Processing data for outliers. Biometrics 1953;9:74–89; Reed AH, Henry RJ,
 *   Mason WB. Clin Chem 1971;17:275–284.
 * Complexity O(n log n) (one sort), then O(1) per step.
 * Throws StatsInputError on an empty array or a non-finite value.
 * @example dixonReedOutliers([148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236]).outliers
 *   // [{ index: 10, value: 236, method: "dixon", reason: "D/R = 0.4659 ≥ 1/3 (high)",
 *   //    evidence: { rule: "dixon", side: "high", kind: "single", gap: 41, range: 88, ratio: 0.4659…,
 *   //                threshold: 1/3, step: 1 } }]
 */
export function dixonReedOutliers(values: readonly number[]): DixonResult {
  assertFiniteSample(values);
  const order = orderOf(values);
  const at = (k: number) => values[order[k]];
  let lo = 0;
  let hi = values.length - 1;
  const outliers: OutlierProposal[] = [];
  const steps: DixonStep[] = [];
  const propose = (k: number, gap: number, range: number, side: OutlierSide, kind: "single" | "block") => {
    const ratio = gap / range;
    outliers.push({
      index: order[k],
      value: at(k),
      method: "dixon",
      reason: `D/R = ${ratio.toFixed(4)} ≥ 1/3 (${side}${kind === "block" ? ", block of two" : ""})`,
      evidence: { rule: "dixon", side, kind, gap, range, ratio, threshold: DIXON_REED_RATIO, step: steps.length },
    });
  };

  while (hi - lo + 1 >= 3) {
    const range = at(hi) - at(lo);
    if (!(range > 0)) break;
    const gHigh = at(hi) - at(hi - 1);
    const gLow = at(lo + 1) - at(lo);
    // Test the side with the larger ratio first; the other is tested on the next round.
    const side: OutlierSide = gHigh >= gLow ? "high" : "low";
    const gap = side === "high" ? gHigh : gLow;
    const ratio = gap / range;
    const flagged = ratio >= DIXON_REED_RATIO;
    steps.push({ side, kind: "single", ratio, flagged });
    if (flagged) {
      if (side === "high") propose(hi--, gap, range, side, "single");
      else propose(lo++, gap, range, side, "single");
      continue;
    }
    if (hi - lo + 1 < 4) break;
    const bgHigh = at(hi - 1) - at(hi - 2);
    const bgLow = at(lo + 2) - at(lo + 1);
    const bSide: OutlierSide = bgHigh >= bgLow ? "high" : "low";
    const bGap = bSide === "high" ? bgHigh : bgLow;
    const bRatio = bGap / range;
    const bFlagged = bRatio >= DIXON_REED_RATIO;
    steps.push({ side: bSide, kind: "block", ratio: bRatio, flagged: bFlagged });
    if (!bFlagged) break;
    if (bSide === "high") {
      propose(hi--, bGap, range, bSide, "block");
      propose(hi--, bGap, range, bSide, "block");
    } else {
      propose(lo++, bGap, range, bSide, "block");
      propose(lo++, bGap, range, bSide, "block");
    }
  }
  return { outliers, steps };
}
