/**
 * LMS age curves as pages and workbooks show them: the limits (2.5th and 97.5th centiles) and the
 * median at a table of ages, and the three centile curves sampled for a chart. Pure: the stored
 * model in, plain numbers out. Read with lmsAt and lmsCentile, so what is shown is what scoring
 * uses at the same age.
 *
 * @see Cole TJ, Green PJ. Stat Med 1992;11:1305–1319; METHODS.md §9.
 */
import { lmsAt, lmsModelSchema, type LmsModel } from "../stats/lms-model";
import { lmsCentile } from "../stats/lms-z";

export interface LmsRow {
  ageYears: number;
  /** 2.5th centile; null where undefined at that age (1 + L·S·z ≤ 0). */
  low: number | null;
  median: number;
  /** 97.5th centile; null likewise. */
  high: number | null;
}

/** Round ages a paediatric laboratory reads limits at (years). */
const LANDMARKS = [1 / 12, 0.25, 0.5, 1, 2, 3, 4, 5, 6, 8, 10, 12, 13, 14, 15, 16, 17, 18, 20, 25, 30, 40, 50, 60, 70, 80];

/**
 * The ages of the limits table: the curves' first and last age and the landmark ages between
 * them, about a dozen at most for a curve from birth to 18 years.
 * @example lmsTableAges({ ageMin: 0.03, ageMax: 17.97 }) // [0.03, 0.08…, 0.25, 0.5, 1, 2, …, 17, 17.97]
 */
export function lmsTableAges(model: Pick<LmsModel, "ageMin" | "ageMax">): number[] {
  const inside = LANDMARKS.filter((a) => a > model.ageMin && a < model.ageMax);
  return [model.ageMin, ...inside, model.ageMax];
}

/** The limits and median at each age (each within the curves' range). Complexity O(ages). */
export function lmsRows(model: LmsModel, ages: readonly number[]): LmsRow[] {
  return ages.map((ageYears) => {
    const p = lmsAt(model, ageYears);
    return { ageYears, low: lmsCentile(p, 2.5), median: p.M, high: lmsCentile(p, 97.5) };
  });
}

/**
 * The 2.5th, 50th and 97.5th centile curves at `steps + 1` ages evenly spaced in √age (the
 * model's own spacing, so infancy, where the curves bend most, gets its share of points).
 */
export function lmsCurvePoints(model: LmsModel, steps = 120): LmsRow[] {
  const t0 = Math.sqrt(model.ageMin);
  const t1 = Math.sqrt(model.ageMax);
  const ages = Array.from({ length: steps + 1 }, (_, i) => {
    // The ends exactly, not their square roots squared back.
    if (i === 0) return model.ageMin;
    if (i === steps) return model.ageMax;
    const t = t0 + ((t1 - t0) * i) / steps;
    return Math.min(model.ageMax, Math.max(model.ageMin, t * t));
  });
  return lmsRows(model, ages);
}

/** The stored model of an lms partition, or null for any other (or an unreadable) model. */
export function lmsModelOf(model: unknown): LmsModel | null {
  const parsed = lmsModelSchema.safeParse(model);
  return parsed.success ? parsed.data : null;
}

/** An age in years as a paediatric laboratory says it: "3 months", "1.5 years", "17.97 years". */
export function ageWords(ageYears: number): string {
  const months = ageYears * 12;
  if (ageYears < 1 && Math.abs(months - Math.round(months)) < 1e-6 && Math.round(months) > 0) {
    const m = Math.round(months);
    return `${m} month${m === 1 ? "" : "s"}`;
  }
  const rounded = Math.round(ageYears * 100) / 100;
  return `${rounded} year${rounded === 1 ? "" : "s"}`;
}

/**
 * Who an lms partition applies to, in words: "F, age curves 0.03 to 17.97 years" (the closed
 * range of the curves, not the half-open band in days that stores it); null for another model.
 */
export function lmsScopeLabel(p: { sex: "F" | "M" | null; model: unknown }): string | null {
  const model = lmsModelOf(p.model);
  if (!model) return null;
  return `${p.sex ? `${p.sex}, ` : ""}age curves ${Math.round(model.ageMin * 100) / 100} to ${Math.round(model.ageMax * 100) / 100} years`;
}
