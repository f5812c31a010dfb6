import { z } from "zod";
import { STUDY_KINDS } from "@/db/schema";

const optionalText = (max: number) => z.string().trim().min(1).max(max).optional();

/** A new study: the analyte by its code, a title, and what the laboratory records about recruitment. */
export const createStudyBody = z
  .object({
    analyte: z.string().trim().min(1, "Give the analyte's code.").max(16),
    title: z.string().trim().min(1, "Give the study a title.").max(200),
    /** `direct` (limits per partition) unless `age_curve` (LMS centile curves in exact age) or `indirect` (limits from routine results). */
    kind: z.enum(STUDY_KINDS, "kind is direct, age_curve or indirect.").default("direct"),
    method: optionalText(200),
    specimen: optionalText(100),
    criteria: optionalText(10_000),
    collectedFrom: z.iso.date().optional(),
    collectedTo: z.iso.date().optional(),
  })
  .strict();

export type NewStudyInput = z.output<typeof createStudyBody>;

export const studyIdParams = z.object({ id: z.uuid("The study id must be a UUID.") });

export const uploadIdParams = studyIdParams.extend({ uploadId: z.uuid("The upload id must be a UUID.") });
