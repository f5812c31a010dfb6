import { z } from "zod";
import { OUTLIER_OPTIONS, TRANSFORM_OPTIONS, type OutlierOption, type TransformOption } from "@/lib/stats/estimate";
import { studyIdParams } from "./input";

/**
 * A partition of a study's donor results: sex, and a half-open age band in years
 * [ageFrom, ageTo); an omitted field is no restriction. The contract shared by the screening,
 * partition and estimate routes (../prompts/contracts.md); the screening work defines the same
 * shape in lib/studies/partitions.ts, and the two are to become one.
 */
export const partitionSchema = z
  .object({
    sex: z.enum(["F", "M"], "sex is F or M.").optional(),
    ageFrom: z.number("ageFrom is an age in years.").min(0, "ageFrom is an age in years from 0.").max(130, "ageFrom is at most 130 years.").optional(),
    ageTo: z.number("ageTo is an age in years.").gt(0, "ageTo is an age in years above 0.").max(130, "ageTo is at most 130 years.").optional(),
  })
  .strict()
  .refine((p) => p.ageFrom === undefined || p.ageTo === undefined || p.ageFrom < p.ageTo, {
    message: "ageFrom must be below ageTo (the band is [ageFrom, ageTo) in years).",
    path: ["ageTo"],
  });

export type Partition = z.output<typeof partitionSchema>;

/** The partition as the API answers it: every field present, null for no restriction. */
export interface PartitionOut {
  sex: "F" | "M" | null;
  ageFrom: number | null;
  ageTo: number | null;
}

export function partitionOut(p: { sex?: string | null; ageFrom?: number | null; ageTo?: number | null }): PartitionOut {
  return { sex: (p.sex ?? null) as "F" | "M" | null, ageFrom: p.ageFrom ?? null, ageTo: p.ageTo ?? null };
}

/** Reads "female 18 to 65 years" style labels for messages and exports. */
export function partitionLabel(p: PartitionOut): string {
  const sex = p.sex === "F" ? "female" : p.sex === "M" ? "male" : "both sexes";
  if (p.ageFrom === null && p.ageTo === null) return `${sex}, all ages`;
  if (p.ageTo === null) return `${sex}, ${p.ageFrom} years and over`;
  return `${sex}, ${p.ageFrom ?? 0} to under ${p.ageTo} years`;
}

/** POST /api/v1/studies/{id}/estimates. */
export const createEstimateBody = z
  .object({
    partition: partitionSchema.optional(),
    outliers: z.enum(OUTLIER_OPTIONS as [OutlierOption, ...OutlierOption[]], `outliers is one of ${OUTLIER_OPTIONS.join(", ")}.`).default("horn"),
    transform: z
      .enum(TRANSFORM_OPTIONS as [TransformOption, ...TransformOption[]], `transform is one of ${TRANSFORM_OPTIONS.join(", ")}.`)
      .default("auto"),
    seed: z
      .number("seed is a whole number.")
      .int("seed is a whole number.")
      .min(-2147483648, "seed fits in 32 bits (−2147483648 to 2147483647).")
      .max(2147483647, "seed fits in 32 bits (−2147483648 to 2147483647).")
      .default(1),
  })
  .strict();

export type CreateEstimateInput = z.output<typeof createEstimateBody>;

export const estimateIdParams = studyIdParams.extend({ estimateId: z.uuid("The estimate id must be a UUID.") });
