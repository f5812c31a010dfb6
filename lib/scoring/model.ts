/**
 * The scoring model stored with each partition of an interval version, and the partition shape
 * that scoring needs. Validated with zod wherever a model enters from outside (database JSON,
 * API, command-line model file).
 */
import { z } from "zod";
import { lmsModelSchema } from "../stats/lms-model";

const finite = z.number().refine(Number.isFinite, "must be a finite number");

/** Gaussian on a transformed scale: z = (g(x) − mean)/sd, g the identity, ln or Box-Cox(λ). */
export const gaussianModelSchema = z
  .object({
    kind: z.literal("gaussian"),
    transform: z.enum(["none", "ln", "box-cox"]),
    lambda: finite.optional(),
    mean: finite,
    sd: finite.refine((v) => v > 0, "sd must be positive"),
    /** "indirect": the fitted non-diseased part of routine results (an indirect study), which scoring cautions about. */
    source: z.literal("indirect").optional(),
  })
  .refine((m) => m.transform !== "box-cox" || m.lambda !== undefined, {
    message: "a box-cox model needs lambda",
    path: ["lambda"],
  });

/** Empirical: the sorted reference values themselves (percentile by the inverse type-6 quantile). */
export const empiricalModelSchema = z.object({
  kind: z.literal("empirical"),
  values: z
    .array(finite)
    .min(2, "an empirical model needs at least 2 reference values")
    .refine((v) => v.every((x, i) => i === 0 || v[i - 1] <= x), "values must be sorted ascending"),
});

/**
 * zlog: z from the partition's two limits alone (Hoffmann et al. 2017), on the log scale (the
 * published method) or, for a lower limit ≤ 0, the linear scale. For adopted intervals, whose
 * reference values the laboratory does not hold.
 */
export const zlogModelSchema = z.object({
  kind: z.literal("zlog"),
  scale: z.enum(["log", "linear"]).default("log"),
});

/**
 * Limits only: a flag and no z or percentile, for a one-sided adopted interval (one limit says
 * nothing of the distribution's centre or spread).
 */
export const limitsModelSchema = z.object({ kind: z.literal("limits") });

/**
 * LMS age curves (Cole & Green 1992; lib/stats/lms-model.ts's stored form, kept exactly): L, M
 * and S at the patient's exact age give z, the percentile and the limits (the 2.5th and 97.5th
 * centiles) at that age. A partition with this model has no fixed limits.
 */
export { lmsModelSchema };

export const scoringModelSchema = z.discriminatedUnion("kind", [
  gaussianModelSchema,
  empiricalModelSchema,
  zlogModelSchema,
  limitsModelSchema,
  lmsModelSchema,
]);

/**
 * One partition of an interval version as scoring sees it: inclusive limits (either may be null
 * for a one-sided interval), the UCUM unit, display decimals, optional critical limits
 * configured by the laboratory, the scoring model and the number of reference values behind it.
 */
export const scoringPartitionSchema = z
  .object({
    low: finite.nullable(),
    high: finite.nullable(),
    unit: z.string().min(1),
    decimals: z.number().int().min(0).max(10).default(1),
    criticalLow: finite.optional(),
    criticalHigh: finite.optional(),
    model: scoringModelSchema,
    n: z.number().int().positive().optional(),
  })
  .refine((p) => p.model.kind === "lms" || p.low !== null || p.high !== null, {
    message: "a partition needs a low or a high limit (only LMS age curves have none)",
  })
  .refine((p) => p.model.kind !== "lms" || (p.low === null && p.high === null), {
    message: "an lms partition's limits follow the age curves: low and high must be null",
    path: ["low"],
  })
  .refine((p) => p.model.kind !== "zlog" || (p.low !== null && p.high !== null && p.low < p.high), {
    message: "a zlog model needs a low limit below a high limit",
    path: ["model"],
  })
  .refine((p) => p.model.kind !== "zlog" || p.model.scale !== "log" || (p.low !== null && p.low > 0), {
    message: "a zlog model on the log scale needs a positive low limit",
    path: ["model"],
  })
  .refine((p) => p.low === null || p.high === null || p.low <= p.high, {
    message: "low must not exceed high",
    path: ["low"],
  })
  .refine((p) => p.criticalLow === undefined || p.low === null || p.criticalLow <= p.low, {
    message: "criticalLow must not exceed low",
    path: ["criticalLow"],
  })
  .refine((p) => p.criticalHigh === undefined || p.high === null || p.criticalHigh >= p.high, {
    message: "criticalHigh must not be below high",
    path: ["criticalHigh"],
  });

export type GaussianModel = z.infer<typeof gaussianModelSchema>;
export type EmpiricalModel = z.infer<typeof empiricalModelSchema>;
export type ZlogModel = z.infer<typeof zlogModelSchema>;
export type ScoringModel = z.infer<typeof scoringModelSchema>;
export type { LmsModel } from "../stats/lms-model";
export type ScoringPartition = z.infer<typeof scoringPartitionSchema>;
/** A partition before defaults are applied (decimals optional). */
export type ScoringPartitionInput = z.input<typeof scoringPartitionSchema>;

/** Limits used for flagging; null means that side is open. */
export interface Limits {
  low: number | null;
  high: number | null;
  criticalLow?: number;
  criticalHigh?: number;
}
