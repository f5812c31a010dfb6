/**
 * An indirect study's estimate: the request (cleaning plan, partition, seed), and the document an
 * `estimates` row keeps: the command line's indirect document (lib/stats/indirect.ts) plus the
 * cleaning steps with their counts, the settings behind the values, the chart's bins, the scoring
 * model a version would take, and the advice a scientist needs before trusting the method.
 */
import { z } from "zod";
import { cleanRoutineResults, type CleaningPlan, type CleaningStep, type RoutineResult } from "@/lib/indirect/cleaning";
import { settingShares, type SettingShare } from "@/lib/indirect/settings";
import type { EngineIdentity } from "@/lib/stats/estimate";
import { indirectReferenceInterval, INDIRECT_MIN_FRACTION, type IndirectEstimate } from "@/lib/stats/indirect";
import { indirectCells } from "@/lib/stats/indirect-cells";
import { indirectHistogram, type IndirectHistogramBin } from "@/lib/stats/indirect-histogram";
import { StatsInputError } from "@/lib/stats/validate";
import { partitionSchema, type Partition } from "./partitions";
import { seedField } from "./seed";

/** Fewer values than this after cleaning and the estimate is refused (Jones et al. 2019 advise thousands; the fit needs hundreds). */
export const INDIRECT_MIN_VALUES = 500;
/** Below this many values the advice says the estimate is imprecise (Bellwether's threshold, after Jones et al. 2019). */
export const INDIRECT_ADVISED_VALUES = 5000;

const isoDate = (name: string) =>
  z
    .string(`${name} is a date, YYYY-MM-DD.`)
    .regex(/^\d{4}-\d{2}-\d{2}$/, `${name} is a date, YYYY-MM-DD.`)
    .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), `${name} is not a date in the calendar.`);

const label = z.string("Each entry is a text.").trim().min(1, "An entry may not be empty.").max(60, "An entry has at most 60 characters.");

/** The data-cleaning steps the scientist chooses (lib/indirect/cleaning.ts runs them in order). */
export const cleaningPlanSchema = z
  .object({
    period: z
      .object({ from: isoDate("period.from"), to: isoDate("period.to") })
      .strict()
      .refine((p) => p.from <= p.to, { message: "period.from must not be after period.to.", path: ["to"] })
      .nullable()
      .default(null),
    excludeSettings: z.array(label, "excludeSettings is a list of settings.").max(50, "Give at most 50 settings.").default([]),
    excludeFlags: z
      .union([z.literal("any"), z.array(label).max(50, "Give at most 50 flags.")], 'excludeFlags is a list of flags or "any".')
      .default([]),
    onePerPatient: z.enum(["first", "last", "all"], "onePerPatient is first, last or all.").default("first"),
  })
  .strict();

export type CleaningPlanInput = z.output<typeof cleaningPlanSchema>;

/**
 * POST /api/v1/studies/{id}/estimates for an indirect study: `method: "indirect"`, the cleaning
 * plan, the partition (sex and age range, the last cleaning step) and the bootstrap's seed.
 */
export const indirectEstimateBody = z
  .object({
    method: z.literal("indirect", 'method is "indirect" for an indirect study.'),
    cleaning: cleaningPlanSchema.default({ period: null, excludeSettings: [], excludeFlags: [], onePerPatient: "first" }),
    partition: partitionSchema.optional(),
    seed: seedField,
  })
  .strict();

export type IndirectEstimateInput = z.output<typeof indirectEstimateBody>;

/** Whether a JSON body asks for an indirect estimate (it names `method: "indirect"`). */
export function asksForIndirect(body: unknown): boolean {
  return typeof body === "object" && body !== null && (body as { method?: unknown }).method === "indirect";
}

/** The power-normal as a scoring model (lib/scoring/model.ts): a gaussian on the Box-Cox scale, ln for λ = 0. */
export interface IndirectScoringModel {
  kind: "gaussian";
  transform: "box-cox" | "ln";
  lambda?: number;
  mean: number;
  sd: number;
  source: "indirect";
}

/** The document an indirect `estimates` row keeps. */
export interface IndirectEstimateDocument extends IndirectEstimate {
  method: "indirect";
  /** The study's results, those with an exclusion in effect (left out first), and each cleaning step. */
  cleaning: { results: number; excluded: number; plan: CleaningPlanInput; partition: Partition; steps: CleaningStep[] };
  /** The settings of the values estimated, largest first, and whether one dominates. */
  settings: { shares: SettingShare[]; warning: string | null };
  /** The chart: every cell with its count and the non-diseased count the fit expects. */
  histogram: IndirectHistogramBin[];
  /** The scoring model a version's partition takes: the fitted non-diseased distribution. */
  model: IndirectScoringModel | null;
  /** What the method assumes and when not to trust it, in plain words; warnings come first. */
  advice: string[];
  provenance: { options: { method: "indirect"; cleaning: CleaningPlanInput; partition: Partition; seed: number }; engine?: EngineIdentity };
}

/** One stored routine result as the estimate reads it. */
export interface StoredRoutineResult {
  patient: string;
  sex: "F" | "M";
  ageYears: number;
  collectedAt: string;
  value: number;
  censoringSide: "below" | "above" | null;
  setting: string | null;
  flags: string[] | null;
}

function planOf(input: IndirectEstimateInput): CleaningPlan {
  const c = input.cleaning;
  return {
    period: c.period,
    excludeSettings: c.excludeSettings,
    excludeFlags: c.excludeFlags,
    onePerPatient: c.onePerPatient,
    partition: input.partition && Object.keys(input.partition).length > 0 ? input.partition : null,
  };
}

/** The fitted distribution as a scoring model; null when the fit gave no usable parameters. */
export function indirectScoringModel(e: Pick<IndirectEstimate, "lambda" | "mu" | "sigma">): IndirectScoringModel | null {
  if (!Number.isFinite(e.lambda) || !Number.isFinite(e.mu) || !(e.sigma > 0)) return null;
  return e.lambda === 0
    ? { kind: "gaussian", transform: "ln", mean: e.mu, sd: e.sigma, source: "indirect" }
    : { kind: "gaussian", transform: "box-cox", lambda: e.lambda, mean: e.mu, sd: e.sigma, source: "indirect" };
}

/**
 * The plain statements of what the method assumes (Jones et al. 2019; Arzideh et al. 2007): the
 * warnings of the estimate and the settings first, then the standing assumptions, then the
 * size of the data behind it.
 */
function adviceOf(estimate: IndirectEstimate, settingsWarning: string | null): string[] {
  const advice = [...estimate.warnings];
  if (settingsWarning) advice.push(settingsWarning);
  advice.push(
    `The method assumes that the non-diseased results form the largest part of the data, concentrated around its mode, and follow one power-normal distribution; it separates them from the rest by fitting that distribution inside a truncation interval. Do not trust it when the non-diseased share is below about ${INDIRECT_MIN_FRACTION * 100}%, when the truncation needed the edge of its search, or when the results come mostly from one setting with much disease.`,
    "Routine results come from patients, not from screened healthy donors: the limits describe the laboratory's low-prevalence population as cleaned here. Compare them with the published or current interval before drafting a version.",
  );
  if (estimate.n < INDIRECT_ADVISED_VALUES) {
    advice.push(`${estimate.n.toLocaleString("en-US")} values were estimated; indirect methods are advised from several thousand values per partition, so these limits are imprecise (see their CIs).`);
  }
  return advice;
}

/**
 * Cleans the study's routine results with the plan (recording each step's counts), estimates the
 * indirect interval of what remains, and assembles the document. Throws StatsInputError when the
 * cleaned results cannot be estimated (too few, or the engine's reason).
 */
export function indirectEstimateDocument({
  rows,
  excluded,
  input,
}: {
  /** The study's routine results without an exclusion in effect, in stored order. */
  rows: readonly StoredRoutineResult[];
  /** How many of the study's results have an exclusion in effect (left out before cleaning). */
  excluded: number;
  input: IndirectEstimateInput;
}): IndirectEstimateDocument {
  const routine: RoutineResult[] = rows.map((r) => ({
    patient: r.patient,
    sex: r.sex,
    ageYears: r.ageYears,
    collectedAt: r.collectedAt,
    value: r.censoringSide === null ? r.value : { value: r.value, side: r.censoringSide },
    setting: r.setting,
    flags: r.flags ?? [],
  }));
  const cleaned = cleanRoutineResults(routine, planOf(input));
  if (cleaned.rows.length < INDIRECT_MIN_VALUES) {
    throw new StatsInputError(
      `${cleaned.rows.length} result${cleaned.rows.length === 1 ? "" : "s"} remain after cleaning; an indirect estimate needs at least ${INDIRECT_MIN_VALUES} (several thousand are advised)`,
    );
  }
  const values = cleaned.rows.map((r) => r.value);
  const estimate = indirectReferenceInterval(values, { seed: input.seed });
  const settings = settingShares(cleaned.rows);
  const histogram = indirectHistogram(indirectCells(values), estimate, estimate.fraction);
  const partition = input.partition ?? {};
  return {
    method: "indirect",
    ...estimate,
    cleaning: { results: rows.length + excluded, excluded, plan: input.cleaning, partition, steps: cleaned.steps },
    settings,
    histogram,
    model: indirectScoringModel(estimate),
    advice: adviceOf(estimate, settings.warning),
    provenance: { options: { method: "indirect", cleaning: input.cleaning, partition, seed: input.seed } },
  };
}
