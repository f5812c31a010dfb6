/**
 * The shapes of the age-curve answers the study page reads: an LMS estimate
 * (POST|GET /api/v1/studies/{id}/estimates… with `method: "lms"`, lib/studies/age-curves.ts) and
 * its chart (GET …/estimates/{estimateId}/age-curves). Plain data for the client components.
 */
import type { LmsCurvesDocument } from "@/lib/stats/lms-curves";
import type { LmsAgeGroup } from "@/lib/stats/lms-diagnostics";

export type FitSex = "F" | "M" | null;

/** One item of GET …/estimates that holds LMS curves. */
export interface LmsListItem {
  id: string;
  options: { method: "lms"; sex: FitSex; seed: number };
  n: number;
  createdAt: string;
  warnings: string[];
}

/** An LMS fit as the estimates API answers it: the `bellwether lms` document and more. */
export interface LmsEstimate extends LmsCurvesDocument {
  id: string;
  method: "lms";
  sex: FitSex;
  seed: number;
  ageRange: { min: number; max: number };
  excluded: number;
  advice: string[];
  sexComparison: {
    harrisBoyd: { verdict: "partition" | "combine"; z: number; zCritical: number; sdRatio: number; sdRatioLimit: number; reasons: string[] };
    women: { n: number; meanZ: number };
    men: { n: number; meanZ: number };
  } | null;
  createdAt: string;
}

export interface AgeCurveDonor {
  id: number;
  donorCode: string;
  sex: string;
  age: number;
  value: number;
  z: number;
}

export interface AgeCurveChart {
  estimateId: string;
  sex: FitSex;
  n: number;
  unit: string;
  ageRange: { min: number; max: number };
  curves: { age: number; lower: number | null; median: number; upper: number | null }[];
  donors: { points: AgeCurveDonor[]; thinned: boolean };
  far: AgeCurveDonor[];
  diagnostics: { groups: LmsAgeGroup[]; warnings: string[]; far: number };
  warnings: string[];
  advice: string[];
}

export const FIT_SEX_WORDS: Record<"F" | "M" | "both", string> = {
  both: "Both sexes together",
  F: "Women and girls",
  M: "Men and boys",
};

export const fitSexWords = (sex: FitSex) => FIT_SEX_WORDS[sex ?? "both"];

/** An age in years in words: months below 2 years. */
export function ageWords(age: number): string {
  if (age < 2) return `${Math.round(age * 12 * 10) / 10} months`;
  return `${Math.round(age * 10) / 10} years`;
}

export function isLmsItem(item: { options: Record<string, unknown> }): boolean {
  return item.options.method === "lms";
}
