import { z } from "zod";
import { seedField } from "./seed";
import { OUTLIER_OPTIONS, TRANSFORM_OPTIONS, type OutlierOption, type TransformOption } from "@/lib/stats/estimate";
import { asksForLms, lmsEstimateBody, type LmsEstimateInput } from "./age-curves";
import { asksForIndirect, indirectEstimateBody, type IndirectEstimateInput } from "./indirect-estimates";
import { studyIdParams } from "./input";
import { partitionLabel as labelOf, partitionSchema, type Partition } from "./partitions";

export type { Partition };

/** The partition as the API answers it: every field present, null for no restriction. */
export interface PartitionOut {
  sex: "F" | "M" | null;
  ageFrom: number | null;
  ageTo: number | null;
}

export function partitionOut(p: { sex?: string | null; ageFrom?: number | null; ageTo?: number | null }): PartitionOut {
  return { sex: (p.sex ?? null) as "F" | "M" | null, ageFrom: p.ageFrom ?? null, ageTo: p.ageTo ?? null };
}

/** The partition with only its given fields, as lib/studies/partitions.ts takes it. */
export function partitionOf(p: PartitionOut): Partition {
  const out: Partition = {};
  if (p.sex !== null) out.sex = p.sex;
  if (p.ageFrom !== null) out.ageFrom = p.ageFrom;
  if (p.ageTo !== null) out.ageTo = p.ageTo;
  return out;
}

/** A partition in words (lib/studies/partitions.ts), from the answer's shape. */
export function partitionLabel(p: PartitionOut): string {
  return labelOf(partitionOf(p));
}

/** POST /api/v1/studies/{id}/estimates. */
export const createEstimateBody = z
  .object({
    partition: partitionSchema.optional(),
    outliers: z.enum(OUTLIER_OPTIONS as [OutlierOption, ...OutlierOption[]], `outliers is one of ${OUTLIER_OPTIONS.join(", ")}.`).default("horn"),
    transform: z
      .enum(TRANSFORM_OPTIONS as [TransformOption, ...TransformOption[]], `transform is one of ${TRANSFORM_OPTIONS.join(", ")}.`)
      .default("auto"),
    seed: seedField,
  })
  .strict();

export type CreateEstimateInput = z.output<typeof createEstimateBody>;

/**
 * The body of POST /api/v1/studies/{id}/estimates as the route parses it: an LMS fit when it names
 * `method: "lms"` (age-curve studies, lib/studies/age-curves.ts), an indirect estimate when it
 * names `method: "indirect"` (indirect studies, lib/studies/indirect-estimates.ts), otherwise a
 * partition's estimate; each checked by its own strict schema, so the messages are that schema's.
 */
export const estimateRequestBody = z.unknown().transform((raw, ctx): EstimateRequest => {
  const kind = asksForLms(raw) ? "lms" : asksForIndirect(raw) ? "indirect" : "direct";
  const schema = kind === "lms" ? lmsEstimateBody : kind === "indirect" ? indirectEstimateBody : createEstimateBody;
  const parsed = schema.safeParse(raw);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) ctx.addIssue({ code: "custom", message: issue.message, path: issue.path, input: raw });
    return z.NEVER;
  }
  return { kind, input: parsed.data } as EstimateRequest;
});

export type EstimateRequest =
  | { kind: "lms"; input: LmsEstimateInput }
  | { kind: "indirect"; input: IndirectEstimateInput }
  | { kind: "direct"; input: CreateEstimateInput };

/** What the API document shows for that body: one of the three. */
export const estimateRequestDocBody = z.union([createEstimateBody, lmsEstimateBody, indirectEstimateBody]);

export const estimateIdParams = studyIdParams.extend({ estimateId: z.uuid("The estimate id must be a UUID.") });
