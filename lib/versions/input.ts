import { z } from "zod";
import { analyteCodeSchema } from "@/lib/analytes/input";
import { PARTITION_METHODS, VERSION_STATES as STATES } from "@/db/schema";

/**
 * The methods a version's partition may name: a direct estimate's, "lms" for an age-curve study's
 * fitted curves, or "indirect" for an indirect study's truncated maximum likelihood estimate.
 */
export const VERSION_PARTITION_METHODS = [...PARTITION_METHODS, "lms", "indirect"] as const;

/** One partition of a version: the estimate it takes its limits (or, for "lms", its curves) from and the method chosen. */
export const versionPartitionInput = z
  .object({
    estimate: z.uuid("estimate is an estimate id (UUID)."),
    method: z.enum(VERSION_PARTITION_METHODS, "method is nonparametric, parametric or robust (limits per partition), lms (age curves) or indirect (routine results)."),
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

const commentField = (name: string, what: string) =>
  z.string(`${name} is text.`).trim().min(1, `Give ${what}.`).max(4000, `Keep ${name} within 4000 characters.`);
const passwordField = z.string("password is your password, as text.").min(1, "Give your password.").max(1024, "password is too long.");
const emailField = z.string("email is your e-mail address, as text.").trim().max(320, "email is too long.").optional();

/** POST …/{id}/return: the comment the author reads. */
export const returnVersionBody = z.object({ comment: commentField("comment", "a comment saying what to change") }).strict();

/** POST …/{id}/sign: `email` too at the first signature of a session. */
export const signVersionBody = z
  .object({
    password: passwordField,
    meaning: z.literal("approved_for_clinical_use", 'meaning is "approved_for_clinical_use": the one meaning of a sign-off.'),
    email: emailField,
  })
  .strict();

/** POST …/{id}/review: the comment says why the version still fits. */
export const reviewVersionBody = z.object({ password: passwordField, comment: commentField("comment", "a comment saying why the version still fits"), email: emailField }).strict();

/** POST …/{id}/withdraw. */
export const withdrawVersionBody = z
  .object({
    password: passwordField,
    reason: commentField("reason", "the reason for withdrawing the version"),
    reinstatePrevious: z.boolean("reinstatePrevious is true or false.").optional(),
    email: emailField,
  })
  .strict();

export const userIdParams = z.object({ id: z.uuid("The user id must be a UUID.") });
