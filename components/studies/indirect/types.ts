/**
 * The shapes of the indirect answers the study page reads: an indirect estimate (POST|GET
 * /api/v1/studies/{id}/estimates… with `method: "indirect"`, lib/studies/indirect-estimates.ts)
 * and its brief form in the estimates list. Plain data for the client components.
 */
import type { IndirectEstimateDocument } from "@/lib/studies/indirect-estimates";

export type { IndirectEstimateDocument };

/** An indirect estimate as the API answers it. */
export type IndirectEstimate = IndirectEstimateDocument & {
  id: string;
  studyId: string;
  partition: { sex: "F" | "M" | null; ageFrom: number | null; ageTo: number | null };
  createdAt: string;
};

/** One item of GET …/estimates that holds an indirect estimate. */
export interface IndirectListItem {
  id: string;
  partition: { sex: "F" | "M" | null; ageFrom: number | null; ageTo: number | null };
  options: { method: "indirect"; seed: number; cleaning: IndirectEstimateDocument["cleaning"]["plan"] };
  n: number;
  createdAt: string;
  warnings: string[];
  indirect: { lower: number | null; upper: number | null; fraction: number };
}

/** The settings and flags of a study's routine results, with how many results carry each (for the cleaning form). */
export interface RoutineVocabulary {
  settings: { name: string; count: number }[];
  flags: { name: string; count: number }[];
  /** First and last collection day, ISO dates; null without results. */
  period: { from: string; to: string } | null;
}

export function isIndirectItem(item: { options: Record<string, unknown> }): boolean {
  return item.options.method === "indirect";
}

/** A partition in words for the indirect sections: "Women and men, all ages" style. */
export function indirectPartitionWords(p: { sex: "F" | "M" | null; ageFrom: number | null; ageTo: number | null }): string {
  const who = p.sex === "F" ? "Women" : p.sex === "M" ? "Men" : "Women and men";
  const ages =
    p.ageFrom !== null && p.ageTo !== null
      ? `aged ${p.ageFrom} to under ${p.ageTo}`
      : p.ageFrom !== null
        ? `aged ${p.ageFrom} and over`
        : p.ageTo !== null
          ? `under ${p.ageTo}`
          : "all ages";
  return `${who}, ${ages}`;
}
