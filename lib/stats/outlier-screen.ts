/**
 * The outlier screen as Bellwether runs it over one partition's measured values: the rule
 * asked for, with Horn's fallback to Tukey fences on the raw scale when a value is not positive.
 * The estimate (estimate.ts) and the app's screen both call this, so both propose the same.
 */
import { dixonReedOutliers } from "./outliers-dixon";
import { hornProposals, hornScreenSorted, type HornScreen } from "./outliers-horn";
import { tukeyOutliers } from "./outliers-tukey";
import type { OutlierMethod, OutlierProposal } from "./outliers";

export interface OutlierScreenResult {
  /** The rule that ran: Tukey when Horn met a value that is not positive; null when none could. */
  rule: OutlierMethod | null;
  /** Every proposal, in the order of the values given. */
  proposals: OutlierProposal[];
  /** When Horn ran: the values sorted once and its screen over them (its kept run and λ). */
  horn: { sorted: Float64Array; screen: HornScreen } | null;
  /** What the caller should be told: the fallback, or a Horn screen stopped by its round cap. */
  warnings: string[];
}

/**
 * Runs one outlier screen over measured values: Horn (Box-Cox then Tukey fences, iterated)
 * when every value is positive and there are at least 4; otherwise, for Horn, Tukey fences on
 * the raw scale (from 4 values) with a warning; Dixon/Reed or Tukey as asked. Nothing runs on
 * no values, nor Horn or its fallback below 4 values. Proposes only: the caller decides.
 * @see Horn PS et al. Clin Chem 2001;47:2137–2145 (outliers-horn.ts); Reed AH et al. Clin Chem
 *   1971;17:275–284 (outliers-dixon.ts); Tukey JW 1977 (outliers-tukey.ts).
 * Complexity O(n log n): one sort, then the rule's own cost.
 * Throws StatsInputError on a non-finite value.
 * @example screenOutliers([4.1, 4.3, 4.4, 4.6, 4.7, 4.9, 5.0, 9.8], "horn").rule // "horn"
 */
export function screenOutliers(values: readonly number[], rule: OutlierMethod): OutlierScreenResult {
  let allPositive = true;
  for (let i = 0; i < values.length; i++) if (values[i] <= 0) allPositive = false;
  if (rule === "horn" && allPositive && values.length >= 4) {
    const sorted = Float64Array.from(values).sort();
    const screen = hornScreenSorted(sorted);
    const warnings = screen.converged
      ? []
      : [`Horn's outlier screen stopped after ${screen.iterations} rounds with values still flagged.`];
    return { rule: "horn", proposals: hornProposals(values, screen), horn: { sorted, screen }, warnings };
  }
  const none: OutlierScreenResult = { rule: null, proposals: [], horn: null, warnings: [] };
  if (values.length === 0) return none;
  const inIndexOrder = (p: OutlierProposal[]) => p.slice().sort((a, b) => a.index - b.index);
  if (rule === "dixon") {
    return { ...none, rule: "dixon", proposals: inIndexOrder(dixonReedOutliers(values).outliers) };
  }
  if (rule === "tukey") {
    return { ...none, rule: "tukey", proposals: inIndexOrder(tukeyOutliers(values).outliers) };
  }
  if (values.length < 4) return none;
  return {
    ...none,
    rule: "tukey",
    proposals: inIndexOrder(tukeyOutliers(values).outliers),
    warnings: ["Horn's method needs positive values; Tukey fences on the raw scale were used instead."],
  };
}
