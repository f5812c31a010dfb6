/** An interval version as the register and the history show it: plain props, dates formatted on the server. */
export interface IntervalPartitionView {
  scope: string;
  limits: string;
  /** "(3.41–3.58) and (5.02–5.20)", or "" when the method gives no CI. */
  cis: string;
  method: string;
  n: number;
  /** LMS age curves: the stored curves (no donor values), drawn with the limits at a table of ages; else null. */
  curves: { sex: "F" | "M" | null; n: number; model: Record<string, unknown> } | null;
}

export interface IntervalVersionView {
  id: string;
  number: number;
  state: string;
  stateLabel: string;
  effectiveFrom: string | null;
  effectiveTo: string | null;
  /** The version's display decimals. */
  decimals: number;
  partitions: IntervalPartitionView[];
  /** The signature that put it in force: who and when. */
  signedOff: { by: string; at: string } | null;
  /** The latest "reviewed: still valid" signature, if any. */
  reviewed: { by: string; at: string } | null;
  reviewBy: string | null;
  /** "overdue by 3 days", "due in 40 days". */
  reviewWords: string | null;
  overdue: boolean;
  withdrawn: { by: string; at: string; reason: string | null } | null;
  note: string | null;
}

export interface RegisterRow {
  code: string;
  name: string;
  loinc: string | null;
  unit: string;
  version: IntervalVersionView;
}
