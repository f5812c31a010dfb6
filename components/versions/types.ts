import type { ReferenceIntervalEstimate } from "@/lib/stats/estimate";
import type { ComparisonAnswer } from "@/lib/versions/comparison";
import type { SignatureView } from "./signature-list";

type Person = { id: string; name: string } | null;

/** The plain data the version pages pass to these components (the page loads it). */
export interface VersionPartitionView {
  id: string;
  sex: "F" | "M" | null;
  ageFromDays: number | null;
  ageToDays: number | null;
  low: number | null;
  high: number | null;
  lowCi: [number, number] | null;
  highCi: [number, number] | null;
  method: string;
  n: number;
  /** The scoring model as the API shows it (LMS age curves carry their curves; never donor values). */
  model: Record<string, unknown>;
}

export interface VersionReviewView {
  version: {
    id: string;
    number: number;
    state: "draft" | "awaiting_signoff" | "in_force" | "superseded" | "withdrawn";
    analyte: { code: string; name: string };
    unit: string;
    decimals: number;
    criticalLow: number | null;
    criticalHigh: number | null;
    note: string | null;
    returnComment: string | null;
    createdAt: Date;
    createdBy: Person;
    submittedAt: Date | null;
    effectiveFrom: Date | null;
    effectiveTo: Date | null;
    partitions: VersionPartitionView[];
  };
  people: {
    submittedBy: Person;
    returnedBy: Person;
    returnedAt: Date | null;
    withdrawnBy: Person;
    withdrawnAt: Date | null;
    withdrawnReason: string | null;
    reviewBy: Date | null;
  };
  signatures: SignatureView[];
  comparison: ComparisonAnswer<{ number: number }>;
  analyte: { code: string; name: string; unit: string; decimals: number };
  study: {
    id: string;
    title: string;
    status: string;
    method: string | null;
    specimen: string | null;
    criteria: string | null;
    collectedFrom: string | null;
    collectedTo: string | null;
  } | null;
  uploads: { fileName: string; sha256: string; status: string; rowsTotal: number }[];
  exclusions:
    | {
        id: string;
        donorCode: string;
        sex: string;
        ageYears: number;
        value: number;
        source: "manual" | "outlier";
        rule: string | null;
        reason: string;
        createdAt: Date;
        createdBy: Person;
      }[]
    | null;
  assessments: { id: string; createdAt: Date; verdict: string; summary: string; groups: { label: string; n: number }[] }[];
  estimates: ({ id: string; n: number; document: ReferenceIntervalEstimate } | null)[];
}
