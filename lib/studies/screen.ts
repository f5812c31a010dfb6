import { screenOutliers } from "@/lib/stats/outlier-screen";
import type { OutlierEvidence, OutlierMethod } from "@/lib/stats/outliers";
import type { ScreenRule } from "./screening-input";

export interface ScreenedDonorValue {
  id: number;
  donorCode: string;
  sex: string;
  ageYears: number;
  value: number;
  censoringSide: "below" | "above" | null;
}

export interface ScreenProposal {
  donorResultId: number;
  donorCode: string;
  sex: string;
  ageYears: number;
  value: number;
  explanation: string;
  evidence: OutlierEvidence;
}

export interface DonorScreen {
  rule: ScreenRule;
  /** The rule that ran (Horn falls back to Tukey on the raw scale); null when none could. */
  ruleApplied: OutlierMethod | null;
  /** Measured values screened. */
  n: number;
  /** Censored donor results left out (a censored value has no number to test). */
  censored: number;
  proposals: ScreenProposal[];
  warnings: string[];
}

/**
 * The engine's outlier screen (lib/stats/outlier-screen.ts, the one estimateReferenceInterval
 * runs) over donor results, in the order given: censored ones are left out and counted; each
 * proposal names its donor result.
 */
export function screenDonorValues(rows: readonly ScreenedDonorValue[], rule: ScreenRule): DonorScreen {
  const measured = rows.filter((r) => r.censoringSide === null);
  const result = screenOutliers(
    measured.map((r) => r.value),
    rule,
  );
  const censored = rows.length - measured.length;
  const warnings = [...result.warnings];
  if (censored > 0) {
    warnings.push(`${censored} censored donor result${censored === 1 ? " was" : "s were"} left out of the screen: a censored value has no number to test.`);
  }
  return {
    rule,
    ruleApplied: result.rule,
    n: measured.length,
    censored,
    proposals: result.proposals.map((p) => {
      const r = measured[p.index];
      return {
        donorResultId: r.id,
        donorCode: r.donorCode,
        sex: r.sex,
        ageYears: r.ageYears,
        value: r.value,
        explanation: p.reason,
        evidence: p.evidence,
      };
    }),
    warnings,
  };
}
