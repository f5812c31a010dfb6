import { z } from "zod";
import { ageBandsSchema, partitionPlanSchema } from "./partitions";

/**
 * POST …/partition-assessment: by sex, or by age bands in years (half-open, contiguous),
 * optionally within one sex.
 */
export const partitionAssessmentBody = z.discriminatedUnion(
  "by",
  [
    z.object({ by: z.literal("sex") }).strict(),
    z
      .object({
        by: z.literal("age"),
        bands: ageBandsSchema,
        sex: z.enum(["F", "M"], "sex is F or M.").optional(),
      })
      .strict(),
  ],
  { error: 'by is "sex" or "age".' },
);

export type PartitionAssessmentInput = z.output<typeof partitionAssessmentBody>;

/** PUT …/partition-plan. */
export const partitionPlanBody = partitionPlanSchema;
