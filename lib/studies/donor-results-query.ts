import { z } from "zod";

/** The donor-result fields a listing may be sorted by. */
export const DONOR_RESULT_SORT_FIELDS = ["rowNumber", "donorCode", "sex", "ageYears", "ageDays", "collectedOn", "value", "id"] as const;
export type DonorResultSortField = (typeof DONOR_RESULT_SORT_FIELDS)[number];

const sortValues = DONOR_RESULT_SORT_FIELDS.flatMap((f) => [f, `-${f}`]);

export const booleanText = z.enum(["true", "false"], 'Use "true" or "false".').transform((v) => v === "true");

/**
 * The query of GET …/donor-results. `excluded=true` lists only the donor results with an
 * exclusion in effect, `excluded=false` only the others.
 */
export const donorResultsQuery = z
  .object({
    page: z.coerce.number().int("page is a whole number from 1.").min(1, "page is a whole number from 1.").default(1),
    pageSize: z.coerce
      .number()
      .int("pageSize is a whole number from 1 to 500.")
      .min(1, "pageSize is a whole number from 1 to 500.")
      .max(500, "pageSize is a whole number from 1 to 500.")
      .default(100),
    sort: z
      .string()
      .refine((s) => sortValues.includes(s), `sort is one of ${DONOR_RESULT_SORT_FIELDS.join(", ")}, with - in front for descending.`)
      .default("rowNumber"),
    sex: z.enum(["F", "M"], "sex is F or M.").optional(),
    ageFrom: z.coerce.number().min(0, "ageFrom is an age in years from 0.").optional(),
    ageTo: z.coerce.number().min(0, "ageTo is an age in years from 0.").optional(),
    excluded: booleanText.optional(),
  })
  .strict();

export type DonorResultsQuery = z.output<typeof donorResultsQuery>;
