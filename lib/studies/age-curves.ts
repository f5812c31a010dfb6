/**
 * Age-curve studies: the LMS fit's request, the document an `estimates` row keeps, the method
 * advice, the sex comparison and the chart's curves. Pure; the database side is
 * db/queries/age-curve-estimates.ts.
 */
import { z } from "zod";
import { seedField } from "./seed";
import type { EngineIdentity } from "@/lib/stats/estimate";
import { harrisBoyd, type HarrisBoydResult } from "@/lib/stats/harris-boyd";
import { estimateLmsCurves, type LmsCurvesDocument } from "@/lib/stats/lms-curves";
import type { LmsAgeGroup } from "@/lib/stats/lms-diagnostics";
import { LMS_MIN_DONORS } from "@/lib/stats/lms-fit";
import { lmsCentileAt, type LmsModel } from "@/lib/stats/lms-model";

/** Donors below which the advice says the curves are a first look only (Cole 2021: SE of the tail centiles). */
export const LMS_ADVISED_DONORS = 400;
/** Ages of the document's table (years), kept where they lie within the donors' ages. */
export const LMS_TABLE_AGES = [0.25, 0.5, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18] as const;
/** Points of each curve in the chart, evenly spread in √age as the fit's own scale. */
export const LMS_CHART_POINTS = 121;
/** Donor points the chart draws at most (thinned evenly by rank in age beyond). */
export const LMS_CHART_DONORS = 2000;
/** Days per year, as lib/uploads and the partition contract count them. */
const DAYS_PER_YEAR = 365.25;

/**
 * POST /api/v1/studies/{id}/estimates for an age-curve study: `method: "lms"`, the donors' sex
 * (F, M, or null for everyone: the scientist chooses combined or separate curves) and the seed of
 * the fit's restart check.
 */
export const lmsEstimateBody = z
  .object({
    method: z.literal("lms", 'method is "lms" for an age-curve study.'),
    sex: z.enum(["F", "M"], "sex is F, M or null (both sexes together).").nullable().default(null),
    seed: seedField,
  })
  .strict();

export type LmsEstimateInput = z.output<typeof lmsEstimateBody>;

/** Whether a JSON body asks for the LMS fit (it names `method: "lms"`). */
export function asksForLms(body: unknown): boolean {
  return typeof body === "object" && body !== null && (body as { method?: unknown }).method === "lms";
}

export interface LmsSexComparison {
  /** Harris-Boyd on the donors' z against the combined curves, women against men: the age effect is taken out first. */
  harrisBoyd: Pick<HarrisBoydResult, "verdict" | "z" | "zCritical" | "sdRatio" | "sdRatioLimit" | "reasons">;
  women: { n: number; meanZ: number };
  men: { n: number; meanZ: number };
}

/** The document an LMS `estimates` row keeps: the command line's curves document and what reproduces and explains it. */
export interface LmsEstimateDocument extends LmsCurvesDocument {
  method: "lms";
  sex: "F" | "M" | null;
  seed: number;
  /** The fitted curves exactly as a version's partition stores them (lib/stats/lms-model.ts). */
  model: LmsModel;
  ageRange: { min: number; max: number };
  criterion: { name: "GAIC"; penalty: number; value: number };
  logLik: number;
  converged: boolean;
  /** Donor results of the sex left out by an exclusion in effect when the fit was made. */
  excluded: number;
  diagnostics: {
    groups: LmsAgeGroup[];
    warnings: string[];
    /** Donors more than 4 SD from the median curve. */
    far: number;
  };
  sexComparison: LmsSexComparison | null;
  advice: string[];
  provenance: { options: { method: "lms"; sex: "F" | "M" | null; seed: number }; engine?: EngineIdentity };
}

/** The table's ages within [min, max], with both ends. */
export function tableAges(min: number, max: number): number[] {
  const inside = LMS_TABLE_AGES.filter((a) => a > min && a < max);
  return [min, ...inside, max];
}

function round(v: number, digits = 3): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}

/**
 * Whether the sexes need separate curves: Harris-Boyd (Clin Chem 1990;36:265–270) on the z of
 * each donor against the combined curves, which is the partition assessment of direct studies
 * applied after the curves have taken out age. Null when either sex has fewer than 2 donors.
 */
export function compareSexes(z: readonly number[], sexes: readonly string[]): LmsSexComparison | null {
  const f: number[] = [];
  const m: number[] = [];
  for (let i = 0; i < z.length; i++) (sexes[i] === "F" ? f : m).push(z[i]);
  if (f.length < 2 || m.length < 2) return null;
  const result = harrisBoyd(f, m);
  const mean = (xs: number[]) => xs.reduce((s, v) => s + v, 0) / xs.length;
  return {
    harrisBoyd: { verdict: result.verdict, z: result.z, zCritical: result.zCritical, sdRatio: result.sdRatio, sdRatioLimit: result.sdRatioLimit, reasons: result.reasons },
    women: { n: f.length, meanZ: mean(f) },
    men: { n: m.length, meanZ: mean(m) },
  };
}

/** The method advice in words, from the donors, the fit's warnings and the sex comparison. */
export function lmsAdvice({ n, sex, warnings, sexComparison }: { n: number; sex: "F" | "M" | null; warnings: readonly string[]; sexComparison: LmsSexComparison | null }): string[] {
  const advice: string[] = [];
  if (n < LMS_ADVISED_DONORS) {
    advice.push(
      `${n} donors fitted: LMS curves from fewer than about ${LMS_ADVISED_DONORS} donors across the age range have wide uncertainty in the 2.5th and 97.5th centiles; read them as a first look and recruit more donors, above all in the age ranges the diagnostics call sparse.`,
    );
  } else {
    advice.push(`${n} donors fitted: enough for LMS curves if the diagnostics show every age range covered.`);
  }
  if (sexComparison) {
    advice.push(
      sexComparison.harrisBoyd.verdict === "partition"
        ? "The sexes differ once age is taken into account (Harris-Boyd on the z against the combined curves): fit women and men separately and draft both."
        : "The sexes do not differ once age is taken into account (Harris-Boyd on the z against the combined curves): the combined curves can serve both.",
    );
  } else if (sex !== null) {
    advice.push(`Curves for ${sex === "F" ? "women and girls" : "men and boys"} only: draft them beside the other sex's curves so that every child is covered.`);
  }
  if (warnings.length > 0) advice.push("Read the warnings before drafting: each says where the curves may not fit the donors.");
  return advice;
}

/**
 * Fits the curves to one sex (or both) and writes the document the estimates row keeps.
 * `sexes` are the donors' sexes (for the comparison, on a combined fit only).
 * Throws StatsInputError as estimateLmsCurves does (fewer than 50 donors, a value ≤ 0, one age).
 */
export function lmsEstimateDocument({
  ages,
  values,
  sexes,
  input,
  excluded,
  notes,
}: {
  ages: readonly number[];
  values: readonly number[];
  sexes: readonly string[];
  input: LmsEstimateInput;
  excluded: number;
  /** Warnings the caller adds (e.g. donors it left out). */
  notes: readonly string[];
}): LmsEstimateDocument {
  let min = Infinity;
  let max = -Infinity;
  for (const a of ages) {
    if (a < min) min = a;
    if (a > max) max = a;
  }
  const at = ages.length > 0 && max > min ? tableAges(min, max) : [0];
  const { document, fit, diagnostics } = estimateLmsCurves(ages, values, { at, seed: input.seed });
  const sexComparison = input.sex === null ? compareSexes(diagnostics.z, sexes) : null;
  const warnings = [...notes, ...document.warnings];
  return {
    ...document,
    warnings,
    method: "lms",
    sex: input.sex,
    seed: input.seed,
    model: fit.model,
    ageRange: { min: fit.model.ageMin, max: fit.model.ageMax },
    criterion: fit.criterion,
    logLik: fit.logLik,
    converged: fit.converged,
    excluded,
    diagnostics: {
      groups: diagnostics.groups,
      warnings: diagnostics.warnings,
      far: diagnostics.z.filter((v) => Math.abs(v) > 4).length,
    },
    sexComparison,
    advice: lmsAdvice({ n: document.n, sex: input.sex, warnings, sexComparison }),
    provenance: { options: { method: "lms", sex: input.sex, seed: input.seed } },
  };
}

export { LMS_MIN_DONORS };

/**
 * The age range in days of a version's partition holding these curves (the partition contract):
 * the days whose age in years, days/365.25, lies in [ageMin, ageMax].
 */
export function lmsPartitionDays(model: Pick<LmsModel, "ageMin" | "ageMax">): { ageFromDays: number; ageToDays: number } {
  return { ageFromDays: Math.ceil(model.ageMin * DAYS_PER_YEAR), ageToDays: Math.floor(model.ageMax * DAYS_PER_YEAR) + 1 };
}

export interface LmsCurvePoint {
  age: number;
  lower: number | null;
  median: number;
  upper: number | null;
}

/** The 2.5th, 50th and 97.5th centile curves at `points` ages evenly spread in √age. */
export function centileCurves(model: LmsModel, points = LMS_CHART_POINTS): LmsCurvePoint[] {
  const a = Math.sqrt(model.ageMin);
  const b = Math.sqrt(model.ageMax);
  const out: LmsCurvePoint[] = [];
  for (let i = 0; i < points; i++) {
    const r = a + ((b - a) * i) / (points - 1);
    // The ends exactly, so that rounding never puts an age outside the curves.
    const age = i === 0 ? model.ageMin : i === points - 1 ? model.ageMax : Math.min(model.ageMax, Math.max(model.ageMin, r * r));
    out.push({ age: round(age, 4), lower: lmsCentileAt(model, age, 2.5), median: lmsCentileAt(model, age, 50)!, upper: lmsCentileAt(model, age, 97.5) });
  }
  return out;
}

/**
 * The lowest 2.5th and the highest 97.5th centile over the curves' ages (on the chart's grid,
 * which has the ends): what the version's critical limits are checked against.
 */
export function curveExtremes(model: LmsModel): { lowest: number | null; highest: number | null } {
  let lowest: number | null = null;
  let highest: number | null = null;
  for (const p of centileCurves(model, 401)) {
    if (p.lower !== null && (lowest === null || p.lower < lowest)) lowest = p.lower;
    if (p.upper !== null && (highest === null || p.upper > highest)) highest = p.upper;
  }
  return { lowest, highest };
}

/** Indices of at most `max` items spread evenly over 0…n−1, both ends kept. */
export function thinIndices(n: number, max: number): number[] {
  if (n <= max) return Array.from({ length: n }, (_, i) => i);
  const out: number[] = [];
  for (let i = 0; i < max; i++) out.push(Math.round((i * (n - 1)) / (max - 1)));
  return out;
}
