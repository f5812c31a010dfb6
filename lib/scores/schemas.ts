/**
 * The scoring API's request and answer shapes (DESIGN.md "REST API", the scoring issue's item
 * contract), as zod schemas: the route handlers parse with them and the OpenAPI document is
 * generated from them, so the two cannot drift. Field names here are contracts with laboratory
 * systems: add fields, never rename or drop one.
 */
import { z } from "zod";
import { analyteCodeSchema } from "@/lib/analytes/input";

/** Most items one request may carry; one more is refused whole with 413. */
export const MAX_SCORE_ITEMS = 10_000;
/** Room for 10,000 items with dates, units and references (about 250 bytes each), with margin. */
export const MAX_SCORE_BODY_BYTES = 4 * 1024 * 1024;
/** POST /api/v1/fhir/Observation/$score: room for 10,000 Observations with a contained Patient each (about 700 bytes), with margin. */
export const MAX_FHIR_BODY_BYTES = 16 * 1024 * 1024;

const isoDate = z.iso.date({ error: "must be a date as YYYY-MM-DD" });
/** A date-time with its offset, or a plain date (taken as that day). */
const isoDateOrDateTime = z.union([z.iso.datetime({ offset: true, error: "must be a date-time such as 2026-03-02T08:15:00Z" }), isoDate]);

/**
 * A patient value: a number, or a censored result as the instrument reports it ("<0.5", ">1000",
 * also "< 0.5" or "<=0.5"), which is scored at the censoring point and flagged accordingly.
 */
export const scoreValueSchema = z.union([
  z.number().refine(Number.isFinite, "value must be a finite number"),
  z.string().trim().min(1).max(32),
]);

/** One item of POST /api/v1/scores. `analyte` (our code) or `loinc` names the analyte. */
export const scoreItemSchema = z
  .object({
    analyte: analyteCodeSchema.optional().meta({ description: "Bellwether's analyte code, e.g. K", example: "K" }),
    loinc: z
      .string()
      .regex(/^[0-9]{1,7}-[0-9]$/, "loinc must look like 2823-3")
      .optional()
      .meta({ description: "A LOINC code, instead of `analyte`", example: "2823-3" }),
    value: scoreValueSchema.meta({ description: 'A number, or a censored result such as "<0.5"', example: 4.9 }),
    unit: z
      .string()
      .min(1)
      .max(64)
      .optional()
      .meta({ description: "UCUM unit of the value; converted to the interval's unit before scoring", example: "mmol/L" }),
    sex: z.enum(["F", "M", "female", "male"]).optional().meta({ description: "Without it the combined partition is used, if the version has one" }),
    ageYears: z.number().min(0).max(150).optional().meta({ description: "Age in years, may be fractional", example: 54 }),
    birthDate: isoDate.optional().meta({ description: "With collectedAt, gives the exact age (wins over ageYears)", example: "1971-06-14" }),
    collectedAt: isoDateOrDateTime.optional().meta({ description: "When the specimen was collected", example: "2026-03-02T08:15:00Z" }),
    ref: z.string().max(64).optional().meta({ description: "The caller's own reference for the item, echoed in its result" }),
  })
  .refine((i) => i.analyte !== undefined || i.loinc !== undefined, { message: "give analyte (our code) or loinc", path: ["analyte"] })
  .refine((i) => (i.birthDate === undefined) === (i.collectedAt === undefined), {
    message: "birthDate and collectedAt go together",
    path: ["birthDate"],
  })
  .meta({ id: "ScoreItem" });

/**
 * The request body as documented. The handler reads `items` as unknown[] and parses each item on
 * its own, so that one bad item answers with an error in its place and does not fail the batch.
 */
export const scoreRequestSchema = z.object({ items: z.array(scoreItemSchema).min(1).max(MAX_SCORE_ITEMS) }).meta({ id: "ScoreRequest" });

/** What the handler parses first: the envelope only. */
export const scoreEnvelopeSchema = z.object({
  items: z.array(z.unknown()).min(1, "send at least one item"),
});

export const flagSchema = z.enum(["LL", "L", "N", "H", "HH", "<", ">"]);

export const partitionAppliesSchema = z
  .object({
    sex: z.enum(["F", "M"]).optional(),
    /** Years, inclusive; from the stored days (days / 365.25, rounded to 2 decimals). */
    ageFrom: z.number().optional(),
    /** Years, exclusive. */
    ageTo: z.number().optional(),
    ageFromDays: z.number().int().optional(),
    ageToDays: z.number().int().optional(),
  })
  .meta({ id: "PartitionApplies" });

export const intervalSchema = z
  .object({
    low: z.number().nullable(),
    high: z.number().nullable(),
    unit: z.string(),
    decimals: z.number().int(),
    /** The version's number for its analyte. */
    version: z.number().int(),
    versionId: z.uuid(),
    partitionId: z.uuid(),
    effectiveFrom: z.string().nullable(),
    reviewBy: z.string().nullable(),
    method: z.string(),
    n: z.number().int(),
    criticalLow: z.number().nullable(),
    criticalHigh: z.number().nullable(),
    partition: partitionAppliesSchema,
  })
  .meta({ id: "Interval" });

/** The model's kind and parameters; never reference values. */
export const modelDescriptionSchema = z
  .discriminatedUnion("kind", [
    z.object({
      kind: z.literal("gaussian"),
      transform: z.enum(["none", "ln", "box-cox"]),
      lambda: z.number().nullable(),
      mean: z.number(),
      sd: z.number(),
    }),
    z.object({ kind: z.literal("empirical"), n: z.number().int() }),
    z.object({ kind: z.literal("zlog"), scale: z.enum(["log", "linear"]) }),
    z.object({ kind: z.literal("limits") }),
    z
      .object({
        kind: z.literal("lms"),
        ageYears: z.number().meta({ description: "The exact age in years at which the curves were read" }),
        L: z.number().meta({ description: "Box-Cox power at that age" }),
        M: z.number().meta({ description: "Median at that age, in the interval's unit" }),
        S: z.number().meta({ description: "Coefficient of variation at that age" }),
        ageMin: z.number().meta({ description: "Youngest age the curves cover, in years" }),
        ageMax: z.number().meta({ description: "Oldest age the curves cover, in years" }),
      })
      .meta({ description: "LMS age curves (Cole & Green 1992) read at the patient's exact age; the interval's low and high are the 2.5th and 97.5th centiles there" }),
  ])
  .meta({ id: "ScoringModelDescription" });

export const scoreResultSchema = z
  .object({
    ref: z.string().optional(),
    analyte: z.object({ code: z.string(), name: z.string(), loinc: z.string().nullable() }),
    /** The value as scored, in the interval's unit (after any conversion). */
    value: z.number(),
    censored: z.enum(["<", ">"]).nullable(),
    z: z.number().nullable(),
    percentile: z.number().nullable(),
    percentileBound: z.enum(["below", "above"]).optional(),
    flag: flagSchema,
    interval: intervalSchema,
    model: modelDescriptionSchema,
    hl7: z.object({ obx7: z.string(), obx8: z.string() }),
    cautions: z.array(z.string()),
    /** The age the partition was chosen by, in years, when one was given or computed. */
    ageYearsUsed: z.number().nullable(),
  })
  .meta({ id: "ScoreResult" });

export const itemErrorSchema = z
  .object({
    ref: z.string().optional(),
    error: z.object({ type: z.string(), title: z.string(), detail: z.string() }),
  })
  .meta({ id: "ScoreItemError" });

export const scoreResponseSchema = z
  .object({
    results: z.array(z.union([scoreResultSchema, itemErrorSchema])),
    /** Each caution code in the results, explained once in a full sentence. */
    cautionTexts: z.record(z.string(), z.string()),
  })
  .meta({ id: "ScoreResponse" });

export type ScoreItem = z.infer<typeof scoreItemSchema>;
export type ScoreResult = z.infer<typeof scoreResultSchema>;
export type ScoreItemError = z.infer<typeof itemErrorSchema>;
export type ScoreResponse = z.infer<typeof scoreResponseSchema>;

/** Most ages one intervals request may ask for. */
export const MAX_INTERVAL_AGES = 200;

/** `?ages=0.5,1,2.25`: years, comma-separated; the limits of every partition at each of them. */
export const intervalsQuery = z.object({
  ages: z
    .string()
    .optional()
    .transform((text, ctx) => {
      if (text === undefined) return undefined;
      const parts = text.split(",").map((t) => t.trim());
      if (parts.length > MAX_INTERVAL_AGES) {
        ctx.addIssue({ code: "custom", message: `give at most ${MAX_INTERVAL_AGES} ages (got ${parts.length})` });
        return z.NEVER;
      }
      const ages: number[] = [];
      for (const part of parts) {
        const age = part === "" ? NaN : Number(part);
        if (!Number.isFinite(age) || age < 0 || age > 150) {
          ctx.addIssue({ code: "custom", message: `"${part}" is not an age in years from 0 to 150; give ages such as 0.5,1,2.25` });
          return z.NEVER;
        }
        ages.push(age);
      }
      return ages;
    })
    .meta({ description: "Ages in years, comma-separated (e.g. 0.5,1,2.25): each partition then lists its limits at those ages that it covers", example: "0.5,4,12" }),
});

/** The path of GET /api/v1/analytes/{code}/intervals: our analyte code, or its LOINC code. */
export const intervalsParams = z.object({
  code: z.string().trim().min(1).max(32).meta({ description: "Our analyte code (e.g. K), or its LOINC code (e.g. 2823-3)", example: "K" }),
});

/** One in-force partition as GET /api/v1/analytes/{code}/intervals answers it. */
export const inForcePartitionSchema = z
  .object({
    id: z.uuid(),
    sex: z.enum(["F", "M"]).nullable().meta({ description: "null: both sexes" }),
    /** Years, inclusive, from the stored days (days / 365.25, rounded to 2 decimals); null for no bound. */
    ageFrom: z.number().nullable(),
    /** Years, exclusive. */
    ageTo: z.number().nullable(),
    ageFromDays: z.number().int().nullable(),
    ageToDays: z.number().int().nullable(),
    low: z.number().nullable(),
    high: z.number().nullable(),
    /** 90% confidence interval of each limit. */
    lowCi: z.tuple([z.number(), z.number()]).nullable().meta({ description: "90% confidence interval of the lower limit" }),
    highCi: z.tuple([z.number(), z.number()]).nullable().meta({ description: "90% confidence interval of the upper limit" }),
    method: z.string(),
    n: z.number().int(),
    unit: z.string(),
    hl7: z.object({ obx7: z.string() }),
    /** LMS age curves: their age range; null for fixed limits. */
    curves: z
      .object({ kind: z.literal("lms"), ageMin: z.number(), ageMax: z.number() })
      .nullable()
      .meta({ description: "For LMS age curves (method lms, low and high null) the ages they cover, in years; null for a partition with fixed limits" }),
    /** With `?ages=`: the limits at each requested age this partition covers. */
    atAges: z
      .array(
        z.object({
          ageYears: z.number(),
          low: z.number().nullable().meta({ description: "The 2.5th centile at that age (null where the curves give none)" }),
          high: z.number().nullable().meta({ description: "The 97.5th centile at that age" }),
          hl7: z.object({ obx7: z.string() }),
        }),
      )
      .optional()
      .meta({ description: "Only with ?ages=: the limits at each requested age that this partition covers (the curves' limits there, or the fixed limits of an age band)" }),
  })
  .meta({ id: "InForcePartition" });

/** The answer of GET /api/v1/analytes/{code}/intervals; `version` is null when none is in force. */
export const inForceIntervalsSchema = z
  .object({
    analyte: z.object({ code: z.string(), name: z.string(), loinc: z.string().nullable(), unit: z.string(), decimals: z.number().int() }),
    version: z
      .object({ id: z.uuid(), number: z.number().int(), effectiveFrom: z.string().nullable(), reviewBy: z.string().nullable() })
      .nullable()
      .meta({ description: "null when no version of the analyte is in force" }),
    partitions: z.array(inForcePartitionSchema),
    /** The ages asked for with `?ages=`, as read. */
    ages: z.array(z.number()).optional().meta({ description: "Only with ?ages=: the ages asked for, in years" }),
  })
  .meta({ id: "InForceIntervals" });

export type InForceIntervals = z.infer<typeof inForceIntervalsSchema>;

/** A FHIR R4 Observation.referenceRange element (lib/scoring/fhir.ts referenceRangeOf). */
export const fhirReferenceRangeSchema = z
  .looseObject({
    low: z.looseObject({ value: z.number(), unit: z.string(), system: z.string(), code: z.string() }).optional(),
    high: z.looseObject({ value: z.number(), unit: z.string(), system: z.string(), code: z.string() }).optional(),
    type: z.looseObject({}).optional(),
    appliesTo: z.array(z.looseObject({})).optional(),
    age: z.looseObject({}).optional(),
    text: z.string().optional(),
  })
  .meta({ id: "FhirReferenceRange", description: "FHIR R4 Observation.referenceRange" });

/** The route's answer: the score service's in-force intervals with each partition's FHIR referenceRange, and the list beside them. */
export const intervalPartitionSchema = inForcePartitionSchema
  .extend({
    referenceRange: fhirReferenceRangeSchema.meta({ description: "The partition as a FHIR R4 Observation.referenceRange element (for LMS curves: a text range over the curves' ages)" }),
    atAges: z
      .array(
        z.object({
          ageYears: z.number(),
          low: z.number().nullable(),
          high: z.number().nullable(),
          hl7: z.object({ obx7: z.string() }),
          referenceRange: fhirReferenceRangeSchema.meta({ description: "The limits at that age as a referenceRange whose age is that exact age (low = high)" }),
        }),
      )
      .optional()
      .meta({ description: "Only with ?ages=: the limits at each requested age this partition covers" }),
  })
  .meta({ id: "IntervalPartition" });

export const analyteIntervalsSchema = inForceIntervalsSchema
  .extend({
    partitions: z.array(intervalPartitionSchema),
    referenceRange: z
      .array(fhirReferenceRangeSchema)
      .meta({
        description:
          "Every partition's referenceRange element: the list an Observation would carry; with ?ages=, LMS curves contribute one element per requested age they cover (its age that exact age) instead of their text range",
      }),
  })
  .meta({ id: "AnalyteIntervals" });

export type AnalyteIntervals = z.infer<typeof analyteIntervalsSchema>;
