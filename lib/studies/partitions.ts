import { z } from "zod";

/** Ages in years that a partition bound may take (inclusive of 130 as an open upper end). */
export const AGE_YEARS_MAX = 130;

const ageBound = (name: string) =>
  z
    .number(`${name} is an age in years.`)
    .min(0, `${name} is an age in years from 0 to ${AGE_YEARS_MAX}.`)
    .max(AGE_YEARS_MAX, `${name} is an age in years from 0 to ${AGE_YEARS_MAX}.`);

/**
 * Who a partition holds: a sex and a half-open age range in years, [ageFrom, ageTo). A field
 * left out puts no restriction on that side, so `{}` is everyone.
 */
export const partitionSchema = z
  .object({
    sex: z.enum(["F", "M"], "sex is F or M.").optional(),
    ageFrom: ageBound("ageFrom").optional(),
    ageTo: ageBound("ageTo").optional(),
  })
  .strict()
  .refine((p) => p.ageFrom === undefined || p.ageTo === undefined || p.ageFrom < p.ageTo, {
    message: "ageFrom must be below ageTo (the range is [ageFrom, ageTo)).",
    path: ["ageTo"],
  });

export type Partition = z.output<typeof partitionSchema>;

/**
 * Age bands in years, each half-open [from, to): at least two, each from below to, following
 * one another without a gap or an overlap, within 0 to 130.
 */
export const ageBandsSchema = z
  .array(z.tuple([ageBound("A band's start"), ageBound("A band's end")], "Each band is [from, to] in years."), "bands is a list of [from, to] pairs in years.")
  .min(2, "Give at least two age bands.")
  .max(20, "Give at most 20 age bands.")
  .superRefine((bands, ctx) => {
    bands.forEach(([from, to], i) => {
      if (!(from < to)) {
        ctx.addIssue({ code: "custom", path: [i], message: `Band ${i + 1} [${from}, ${to}) must start below its end.` });
      }
      if (i > 0 && from !== bands[i - 1][1]) {
        const prev = bands[i - 1];
        ctx.addIssue({
          code: "custom",
          path: [i],
          message:
            from > prev[1]
              ? `Bands must follow one another: band ${i + 1} starts at ${from}, band ${i} ends at ${prev[1]} (a gap).`
              : `Bands must not overlap: band ${i + 1} starts at ${from}, band ${i} ends at ${prev[1]}.`,
        });
      }
    });
  });

export type AgeBands = z.output<typeof ageBandsSchema>;

/** The partitions a study's scientist chose: split by sex or not, and by age bands or not. */
export const partitionPlanSchema = z
  .object({
    sex: z.boolean("sex is true or false."),
    ageBands: ageBandsSchema.nullable(),
  })
  .strict();

export type PartitionPlan = z.output<typeof partitionPlanSchema>;

/**
 * The partitions a plan yields, sex first (F then M), then the age bands in order; one
 * partition of everyone (`{}`) for no plan or a plan that splits nothing.
 * @example partitionsOfPlan({ sex: true, ageBands: [[0, 18], [18, 120]] }).length // 4
 */
export function partitionsOfPlan(plan: PartitionPlan | null | undefined): Partition[] {
  const sexes: ("F" | "M" | undefined)[] = plan?.sex ? ["F", "M"] : [undefined];
  const bands: ([number, number] | undefined)[] = plan?.ageBands ? plan.ageBands : [undefined];
  const out: Partition[] = [];
  for (const sex of sexes) {
    for (const band of bands) {
      const p: Partition = {};
      if (sex) p.sex = sex;
      if (band) {
        p.ageFrom = band[0];
        p.ageTo = band[1];
      }
      out.push(p);
    }
  }
  return out;
}

/**
 * A partition in words, e.g. "F, age 18 to under 120", "M", "age under 18", "All donors".
 */
export function partitionLabel(partition: Partition | null | undefined): string {
  const parts: string[] = [];
  if (partition?.sex) parts.push(partition.sex);
  const from = partition?.ageFrom;
  const to = partition?.ageTo;
  if (from !== undefined && to !== undefined) parts.push(`age ${from} to under ${to}`);
  else if (from !== undefined) parts.push(`age ${from} and over`);
  else if (to !== undefined) parts.push(`age under ${to}`);
  return parts.length > 0 ? parts.join(", ") : "All donors";
}

/** Whether a donor result (its sex and age in years) belongs to a partition. */
export function inPartition(partition: Partition | null | undefined, donor: { sex: string; ageYears: number }): boolean {
  if (!partition) return true;
  if (partition.sex !== undefined && donor.sex !== partition.sex) return false;
  if (partition.ageFrom !== undefined && !(donor.ageYears >= partition.ageFrom)) return false;
  if (partition.ageTo !== undefined && !(donor.ageYears < partition.ageTo)) return false;
  return true;
}

/** A partition with only its given fields, in a fixed key order (for storage and answers). */
export function normalPartition(partition: Partition | null | undefined): Partition {
  const p: Partition = {};
  if (partition?.sex !== undefined) p.sex = partition.sex;
  if (partition?.ageFrom !== undefined) p.ageFrom = partition.ageFrom;
  if (partition?.ageTo !== undefined) p.ageTo = partition.ageTo;
  return p;
}
