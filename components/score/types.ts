/**
 * What the score page receives from the server (plain props) and what it sends: one analyte of the
 * catalogue as the search offers it, and the patient fields entered once for a panel.
 */
export interface ScoreAnalyte {
  code: string;
  name: string;
  loinc: string | null;
  unit: string;
  decimals: number;
  specimen: string;
  /** The version in force, or null with `unavailable` saying why nothing can be scored. */
  inForce: {
    number: number;
    effectiveFrom: string | null;
    /** Who the interval's partitions apply to, in words ("F", "M, age 18 and over"). */
    partitions: string[];
    bySex: boolean;
    byAge: boolean;
  } | null;
  unavailable: string | null;
}

export type SexInput = "" | "F" | "M";

export interface PatientInput {
  sex: SexInput;
  ageYears: string;
  birthDate: string;
  collectedOn: string;
}

export interface ValueInput {
  /** A key for React and the request's `ref`. */
  key: string;
  analyte: string | null;
  value: string;
  unit: string;
}
