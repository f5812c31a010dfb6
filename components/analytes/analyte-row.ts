/** One analyte as the catalogue page shows it: numbers already formatted on the server. */
export interface AnalyteRow {
  code: string;
  name: string;
  unit: string;
  decimals: number;
  loinc: string;
  specimen: string;
  /** "2.8 – 6.2", "< 2.8", "> 6.2" or "—", in the analyte's decimals. */
  criticalLimits: string;
  reviewMonths: number;
  /** What the edit form starts from: each field as the person would type it. */
  values: Record<AnalyteField, string>;
}

export type AnalyteField =
  | "code"
  | "name"
  | "unit"
  | "decimals"
  | "loinc"
  | "specimen"
  | "reviewMonths"
  | "criticalLow"
  | "criticalHigh"
  | "molarMass"
  | "molarMassSource";
