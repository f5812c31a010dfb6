/** What the adoption-check pages pass to their components: plain objects, dates formatted. */

export type AdoptionDecision = "accepted" | "second_set_needed" | "not_verified";

export const DECISION_LABELS: Record<AdoptionDecision, string> = {
  accepted: "Accepted",
  second_set_needed: "Second set needed",
  not_verified: "Not verified",
};

export const DECISION_TONES = { accepted: "ok", second_set_needed: "warn", not_verified: "neutral" } as const;

export interface CheckAnalyte {
  code: string;
  name: string;
  unit: string;
}

/** One row of the checks table. */
export interface CheckRow {
  id: string;
  analyte: string;
  analyteName: string;
  interval: string;
  sex: string;
  source: string;
  decision: AdoptionDecision;
  outside: string;
  checkedOn: string;
}

/** "3.5–5.1 mmol/L", "≤ 40 U/L", "≥ 2.1 mmol/L". */
export function intervalText(lower: number | null, upper: number | null, unit: string): string {
  if (lower !== null && upper !== null) return `${lower}–${upper} ${unit}`;
  return lower !== null ? `≥ ${lower} ${unit}` : `≤ ${upper} ${unit}`;
}

export const SEX_WORDS = { F: "Women", M: "Men" } as const;
