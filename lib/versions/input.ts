import { z } from "zod";
import { analyteCodeSchema } from "@/lib/analytes/input";
import { PARTITION_METHODS, VERSION_STATES as STATES } from "@/db/schema";

/** One partition of a version: the estimate it takes its limits from and the method chosen. */
export const versionPartitionInput = z
  .object({
    estimate: z.uuid("estimate is an estimate id (UUID)."),
    method: z.enum(PARTITION_METHODS, "method is nonparametric, parametric or robust."),
  })
  .strict();

const partitionsField = z
  .array(versionPartitionInput, "partitions is a list of {estimate, method}.")
  .min(1, "Give at least one partition.")
  .max(64, "An interval version holds at most 64 partitions.");
const criticalField = (name: string) => z.number(`${name} is a number in the analyte's unit, or null.`).nullable().optional();
const noteField = z.string("note is text.").trim().max(4000, "Keep the note within 4000 characters.").nullable().optional();

/**
 * POST /api/v1/interval-versions: from a study's estimates (`study` and `partitions`), or from an
 * accepted adoption check (`adoptionCheck`: one partition with the check's limits). Critical
 * limits default to the analyte's.
 */
export const createVersionBody = z
  .object({
    analyte: analyteCodeSchema,
    study: z.uuid("study is a study id (UUID).").optional(),
    partitions: partitionsField.optional(),
    adoptionCheck: z.uuid("adoptionCheck is an adoption check id (UUID).").optional(),
    criticalLow: criticalField("criticalLow"),
    criticalHigh: criticalField("criticalHigh"),
    note: noteField,
  })
  .strict()
  .superRefine((b, ctx) => {
    if (b.adoptionCheck !== undefined) {
      for (const key of ["study", "partitions"] as const) {
        if (b[key] !== undefined) {
          ctx.addIssue({ code: "custom", path: [key], message: "A version drafted from an adoption check takes no study or partitions: its one partition is the check's." });
        }
      }
      return;
    }
    if (b.study === undefined) ctx.addIssue({ code: "custom", path: ["study"], message: "Give study and partitions, or adoptionCheck." });
    if (b.partitions === undefined) ctx.addIssue({ code: "custom", path: ["partitions"], message: "Give study and partitions, or adoptionCheck." });
  });

/** PATCH /api/v1/interval-versions/{id}: what is given replaces what the draft holds; null clears. */
export const updateVersionBody = z
  .object({ partitions: partitionsField.optional(), criticalLow: criticalField("criticalLow"), criticalHigh: criticalField("criticalHigh"), note: noteField })
  .strict()
  .refine((b) => Object.values(b).some((v) => v !== undefined), "Give at least one of partitions, criticalLow, criticalHigh, note.");

export const listVersionsQuery = z
  .object({
    analyte: analyteCodeSchema.optional(),
    state: z.enum(STATES, `state is one of ${STATES.join(", ")}.`).optional(),
  })
  .strict();

export const versionIdParams = z.object({ id: z.uuid("The interval version id must be a UUID.") });

export type CreateVersionInput = z.output<typeof createVersionBody>;
export type UpdateVersionInput = z.output<typeof updateVersionBody>;
export type VersionPartitionInput = z.output<typeof versionPartitionInput>;
export type ListVersionsQuery = z.output<typeof listVersionsQuery>;
