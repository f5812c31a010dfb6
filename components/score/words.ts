import type { ScoreItem, ScoreResult } from "@/lib/scores/schemas";
import { formatPercentile, formatValue, formatZ } from "@/lib/format";
import type { PatientInput, ValueInput } from "./types";

type Flag = ScoreResult["flag"];

/** A flag in words: where the value sits, never what it means for the patient. */
export const FLAG_WORDS: Record<Flag, string> = {
  N: "Within the reference interval",
  L: "Below the reference interval",
  H: "Above the reference interval",
  LL: "Below the critical low limit",
  HH: "Above the critical high limit",
  "<": "Below the measuring range; its place against the interval is not known",
  ">": "Above the measuring range; its place against the interval is not known",
};

/** The flag's badge colours; the letter and the words carry the meaning, colour only repeats it. */
export const FLAG_TONES: Record<Flag, string> = {
  N: "bg-green-50 text-signal-ok border-signal-ok/30",
  L: "bg-blue-50 text-signal-low border-signal-low/30",
  H: "bg-amber-50 text-amber-800 border-signal-warn/30",
  LL: "bg-red-50 text-signal-high border-signal-high/40",
  HH: "bg-red-50 text-signal-high border-signal-high/40",
  "<": "bg-ink-100 text-ink-700 border-ink-300",
  ">": "bg-ink-100 text-ink-700 border-ink-300",
};

/**
 * A percentile for people: one decimal, "< 0.1" and "> 99.9" at the extremes (UX.md), and a bound
 * in words when the value is censored or beyond the model's range ("below 0.4").
 */
export function percentileText(p: number | null, bound?: "below" | "above"): string {
  if (p === null) return "—";
  if (!bound) return formatPercentile(p);
  if (bound === "below") return `below ${p < 0.05 ? "0.1" : formatPercentile(p)}`;
  return `above ${p >= 99.95 ? "99.9" : formatPercentile(p)}`;
}

/** A z-score with 2 decimals, a bound in words like the percentile's. */
export function zText(z: number | null, bound?: "below" | "above"): string {
  if (z === null) return "—";
  return bound ? `${bound} ${formatZ(z)}` : formatZ(z);
}

/** The interval as "3.5–5.1", or one side ("≤ 5.1", "≥ 3.5"). */
export function intervalText(interval: { low: number | null; high: number | null; decimals: number }): string {
  const f = (v: number | null) => formatValue(v, interval.decimals);
  if (interval.low === null && interval.high === null) return "—";
  if (interval.low === null) return `≤ ${f(interval.high)}`;
  if (interval.high === null) return `≥ ${f(interval.low)}`;
  return `${f(interval.low)}–${f(interval.high)}`;
}

/** Who the partition that applied covers, in words. */
export function partitionWords(p: ScoreResult["interval"]["partition"]): string {
  const parts: string[] = [];
  if (p.sex) parts.push(p.sex === "F" ? "female" : "male");
  const from = p.ageFrom;
  const to = p.ageTo;
  if (from !== undefined && to !== undefined) parts.push(`age ${from} to under ${to} years`);
  else if (from !== undefined) parts.push(`age ${from} years and over`);
  else if (to !== undefined) parts.push(`age under ${to} years`);
  return parts.length ? parts.join(", ") : "everyone (no partition by sex or age)";
}

/** The value as scored, with its censoring sign. */
export function valueText(r: ScoreResult): string {
  return `${r.censored ?? ""}${formatValue(r.value, r.interval.decimals)}`;
}

/** A value as typed: a number is sent as a number, anything else ("<0.5") as the string. */
function valueOf(typed: string): number | string {
  const t = typed.trim().replace(/,(?=\d+$)/, ".");
  return /^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(t) ? Number(t) : t;
}

/**
 * The request's items for the values of one patient: the sex and the age (a birth date with the
 * collection date wins over years) entered once, a unit only where it differs from the analyte's.
 */
export function scoreItemsOf(patient: PatientInput, values: ValueInput[], units: Record<string, string>): ScoreItem[] {
  const age = patient.ageYears.trim().replace(",", ".");
  return values.map((v) => {
    const item: ScoreItem = { analyte: v.analyte ?? "", value: valueOf(v.value), ref: v.key };
    const unit = v.unit.trim();
    if (unit && unit !== units[v.analyte ?? ""]) item.unit = unit;
    if (patient.sex) item.sex = patient.sex;
    if (patient.birthDate) {
      item.birthDate = patient.birthDate;
      item.collectedAt = patient.collectedOn || new Date().toISOString().slice(0, 10);
    } else if (age !== "") {
      item.ageYears = Number(age);
    }
    return item;
  });
}
