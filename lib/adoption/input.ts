import { z } from "zod";
import { analyteCodeSchema } from "@/lib/analytes/input";
import { ADOPTION_POLICY } from "./policy";

const N = ADOPTION_POLICY.valuesPerSet;

/** Exactly the policy's number of finite numbers (zod's number refuses NaN and ±Infinity). */
export const adoptionValuesSchema = z
  .array(z.number(`each value is a number in the analyte's unit.`), `values is a list of ${N} numbers.`)
  .refine((v) => v.length === N, { message: `Give exactly ${N} values.` });

const limit = (name: string) => z.number(`${name} is a number in the analyte's unit, or null.`).nullable().optional().transform((v) => v ?? null);

/** POST /api/v1/adoption-checks. */
export const createAdoptionCheckBody = z
  .object({
    analyte: analyteCodeSchema,
    sex: z.enum(["F", "M"], "sex is F, M or null (both sexes).").nullable().optional().transform((v) => v ?? null),
    lower: limit("lower"),
    upper: limit("upper"),
    source: z
      .string("source is text: where the interval comes from (a manufacturer's insert, a publication).")
      .trim()
      .min(1, "Say where the interval comes from (a manufacturer's insert, a publication).")
      .max(2000, "Keep the source within 2000 characters."),
    values: adoptionValuesSchema,
  })
  .strict()
  .superRefine((b, ctx) => {
    if (b.lower === null && b.upper === null) {
      ctx.addIssue({ code: "custom", path: ["upper"], message: "Give a lower limit, an upper limit or both." });
    } else if (b.lower !== null && b.upper !== null && !(b.lower < b.upper)) {
      ctx.addIssue({ code: "custom", path: ["lower"], message: `lower (${b.lower}) must be below upper (${b.upper}).` });
    }
  });

/** POST /api/v1/adoption-checks/{id}/second-set. */
export const secondSetBody = z.object({ values: adoptionValuesSchema }).strict();

export const listAdoptionChecksQuery = z
  .object({
    analyte: analyteCodeSchema.optional(),
    decision: z.enum(["accepted", "second_set_needed", "not_verified"], "decision is accepted, second_set_needed or not_verified.").optional(),
  })
  .strict();

export const adoptionCheckIdParams = z.object({ id: z.uuid("The adoption check id must be a UUID.") });

export type CreateAdoptionCheckInput = z.output<typeof createAdoptionCheckBody>;
export type ListAdoptionChecksQuery = z.output<typeof listAdoptionChecksQuery>;
