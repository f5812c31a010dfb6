/**
 * The data-cleaning steps that come before an indirect reference interval, as pure functions
 * over routine results. Each step reports how many results it removed, so that the dossier can
 * show the path from the raw file to the estimate.
 *
 * The steps are those the IFCC committee recommends (Jones et al. 2019; METHODS.md §8.1): a
 * stable analytical period, low-prevalence settings only (the scientist excludes inpatient,
 * emergency …), no results with interference flags, one result per patient (first or last:
 * keeping every result widens the interval; Arzideh et al., J Lab Med 2021), and partitions by
 * sex and age. They run in that order, so that a patient's first or last result is chosen among
 * the results that are eligible (our stated order), and the partition uses the age at the
 * result that was kept.
 */
import type { RoutineValue } from "../stats/indirect-cells";

export interface RoutineResult {
  /** Pseudonymous patient key. */
  patient: string;
  sex: "F" | "M";
  ageYears: number;
  /** Collection date and time, ISO 8601 ("2025-03-04T08:15"); the date part decides the period. */
  collectedAt: string;
  value: RoutineValue;
  /** Outpatient, inpatient, emergency …; null when the file has none. */
  setting?: string | null;
  /** Interference or other flags on the result (haemolysis, icterus, lipaemia …). */
  flags?: readonly string[];
}

export interface CleaningPlan {
  /** Keep results collected on these dates, inclusive ("YYYY-MM-DD"); null keeps all. */
  period?: { from: string; to: string } | null;
  /** Settings to exclude, compared without regard to case. */
  excludeSettings?: readonly string[];
  /** Flags that exclude a result, or "any" for every flagged result. */
  excludeFlags?: readonly string[] | "any";
  /** Keep each patient's first or last result (by collection time), or all of them. */
  onePerPatient: "first" | "last" | "all";
  /** The partition to estimate: sex and the half-open age range [ageFrom, ageTo) in years. */
  partition?: { sex?: "F" | "M"; ageFrom?: number; ageTo?: number } | null;
}

export type CleaningStepName = "period" | "settings" | "flags" | "one-per-patient" | "partition";

export interface CleaningStep {
  step: CleaningStepName;
  /** What the step did, in words for the dossier. */
  description: string;
  /** Results before the step, removed by it, and left after it. */
  before: number;
  removed: number;
  remaining: number;
}

export interface CleaningResult<T extends RoutineResult> {
  rows: T[];
  steps: CleaningStep[];
}

/** The date part of an ISO date-time, "YYYY-MM-DD". */
function dateOf(iso: string): string {
  return iso.slice(0, 10);
}

/**
 * Results collected within a stable analytical period (dates inclusive).
 * @see Jones GRD et al. Clin Chem Lab Med 2019;57:20–29 (a stable analytical period).
 * Complexity O(n). Throws nothing.
 * @example restrictToPeriod(rows, { from: "2025-01-01", to: "2025-06-30" })
 */
export function restrictToPeriod<T extends RoutineResult>(rows: readonly T[], period: { from: string; to: string }): T[] {
  return rows.filter((r) => {
    const d = dateOf(r.collectedAt);
    return d >= period.from && d <= period.to;
  });
}

/**
 * Results whose setting is not among the excluded ones (case-insensitive); a result without a
 * setting is kept.
 * @see Jones GRD et al. Clin Chem Lab Med 2019;57:20–29 (prefer low-prevalence sources).
 * Complexity O(n). Throws nothing.
 * @example excludeSettings(rows, ["inpatient", "emergency"])
 */
export function excludeSettings<T extends RoutineResult>(rows: readonly T[], settings: readonly string[]): T[] {
  const out = new Set(settings.map((s) => s.trim().toLowerCase()));
  return rows.filter((r) => r.setting == null || !out.has(r.setting.trim().toLowerCase()));
}

/**
 * Results without an excluding flag ("any": without any flag).
 * @see Jones GRD et al. Clin Chem Lab Med 2019;57:20–29 (interference flags).
 * Complexity O(n·f). Throws nothing.
 * @example excludeFlagged(rows, ["haemolysed"])
 */
export function excludeFlagged<T extends RoutineResult>(rows: readonly T[], flags: readonly string[] | "any"): T[] {
  if (flags === "any") return rows.filter((r) => (r.flags ?? []).length === 0);
  const out = new Set(flags.map((f) => f.trim().toLowerCase()));
  return rows.filter((r) => !(r.flags ?? []).some((f) => out.has(f.trim().toLowerCase())));
}

/**
 * Each patient's first or last result by collection time, compared as local ISO 8601 text of one
 * format (ties: the earlier row in the file is the earlier result). The rows keep their order.
 * @see Jones GRD et al. Clin Chem Lab Med 2019;57:20–29; Arzideh F et al. J Lab Med 2021
 *   (first or last results both work; keeping all results biases the interval).
 * Complexity O(n). Throws nothing.
 * @example onePerPatient(rows, "first")
 */
export function onePerPatient<T extends RoutineResult>(rows: readonly T[], which: "first" | "last"): T[] {
  const chosen = new Map<string, number>();
  rows.forEach((r, i) => {
    const j = chosen.get(r.patient);
    if (j === undefined) {
      chosen.set(r.patient, i);
      return;
    }
    // Local ISO 8601 text ("YYYY-MM-DD" or "YYYY-MM-DDTHH:MM[:SS]") orders as text, a date alone as
    // its midnight; parsing it as a local time would misorder an hour at a daylight-saving change.
    const a = rows[j].collectedAt;
    const b = r.collectedAt;
    if (which === "first" ? b < a : b >= a) chosen.set(r.patient, i);
  });
  const keep = new Set(chosen.values());
  return rows.filter((_, i) => keep.has(i));
}

/**
 * Results of one partition: a sex and the half-open age range [ageFrom, ageTo) in years; a
 * field left out restricts nothing.
 * @see Jones GRD et al. Clin Chem Lab Med 2019;57:20–29 (partition by sex and age).
 * Complexity O(n). Throws nothing.
 * @example inPartition(rows, { sex: "F", ageFrom: 18, ageTo: 65 })
 */
export function inPartition<T extends RoutineResult>(
  rows: readonly T[],
  p: { sex?: "F" | "M"; ageFrom?: number; ageTo?: number },
): T[] {
  return rows.filter(
    (r) =>
      (p.sex === undefined || r.sex === p.sex) &&
      (p.ageFrom === undefined || r.ageYears >= p.ageFrom) &&
      (p.ageTo === undefined || r.ageYears < p.ageTo),
  );
}

/**
 * Runs the cleaning plan's steps in order (period, settings, flags, one per patient,
 * partition), recording for each the results before it, removed by it and left after it. A
 * step the plan leaves out is not recorded.
 * @see Jones GRD et al. Clin Chem Lab Med 2019;57:20–29; METHODS.md §8.1.
 * Complexity O(n) per step. Throws nothing.
 * @example cleanRoutineResults(rows, { onePerPatient: "first", excludeSettings: ["inpatient"] }).steps
 */
export function cleanRoutineResults<T extends RoutineResult>(rows: readonly T[], plan: CleaningPlan): CleaningResult<T> {
  const steps: CleaningStep[] = [];
  let current: T[] = rows.slice();
  const record = (step: CleaningStepName, description: string, next: T[]) => {
    steps.push({ step, description, before: current.length, removed: current.length - next.length, remaining: next.length });
    current = next;
  };
  if (plan.period) {
    record("period", `kept results collected from ${plan.period.from} to ${plan.period.to}`, restrictToPeriod(current, plan.period));
  }
  if (plan.excludeSettings && plan.excludeSettings.length > 0) {
    record("settings", `excluded the settings ${plan.excludeSettings.join(", ")}`, excludeSettings(current, plan.excludeSettings));
  }
  if (plan.excludeFlags && (plan.excludeFlags === "any" || plan.excludeFlags.length > 0)) {
    const what = plan.excludeFlags === "any" ? "every flagged result" : `results flagged ${plan.excludeFlags.join(", ")}`;
    record("flags", `excluded ${what}`, excludeFlagged(current, plan.excludeFlags));
  }
  if (plan.onePerPatient !== "all") {
    record("one-per-patient", `kept each patient's ${plan.onePerPatient} result`, onePerPatient(current, plan.onePerPatient));
  }
  if (plan.partition) {
    const p = plan.partition;
    const parts = [
      p.sex === undefined ? null : p.sex === "F" ? "females" : "males",
      p.ageFrom === undefined && p.ageTo === undefined ? null : `aged ${p.ageFrom ?? 0} to under ${p.ageTo ?? "any age"}`,
    ].filter(Boolean);
    record("partition", `kept the partition ${parts.join(", ") || "everyone"}`, inPartition(current, p));
  }
  return { rows: current, steps };
}
