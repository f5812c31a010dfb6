/**
 * Synthetic routine results for the demo's indirect study: invented patients of an invented
 * laboratory, drawn from the project's seeded generator and written as the routine-results
 * template's CSV, so that the demo goes through the same check and commit as a scientist's
 * export from the laboratory system. Each setting mixes non-diseased results with results of
 * patients with disease above and below, the inpatient and emergency settings far more than the
 * outpatient one; some patients come back; a few results carry interference flags. No real
 * person, laboratory or patient is behind any of it.
 */
import { demoDraws, type DemoDraws } from "./demo-donors";

const DAY_MS = 86_400_000;

/** The values of one kind of patient: non-diseased, or with disease below or above. */
type Draw = (draws: DemoDraws) => number;

export interface DemoRoutineData {
  seed: number;
  /** Pseudonymous patient keys are this prefix and a running number. */
  keyPrefix: string;
  patients: number;
  /** First and last collection day, ISO dates. */
  collected: [string, string];
  decimals: number;
  /** Reported below this as "<limit" (the measuring range's lower end). */
  lowerLimit: number;
  nonDiseased: Draw;
  low: Draw;
  high: Draw;
  /** Per setting: its share of patients, and its shares of disease below and above. */
  settings: { name: string; share: number; low: number; high: number }[];
  /** Per flag: the share of results that carry it. */
  flags: { name: string; share: number }[];
}

function pick<T extends { share: number }>(items: readonly T[], u: number): T {
  let acc = 0;
  for (const item of items) {
    acc += item.share;
    if (u < acc) return item;
  }
  return items[items.length - 1];
}

const two = (v: number) => String(v).padStart(2, "0");

function isoDateTime(ms: number): string {
  const d = new Date(ms);
  return `${d.getUTCFullYear()}-${two(d.getUTCMonth() + 1)}-${two(d.getUTCDate())}T${two(d.getUTCHours())}:${two(d.getUTCMinutes())}`;
}

/**
 * The data as the routine-results template's CSV (patient_key, sex, age_years, collected_at,
 * value, setting, flags): one to three results per patient, each on its own day and time; the
 * same seed always gives the same bytes.
 */
export function routineCsv(data: DemoRoutineData): string {
  const draws = demoDraws(data.seed);
  const from = Date.parse(`${data.collected[0]}T00:00:00Z`);
  const days = Math.round((Date.parse(`${data.collected[1]}T00:00:00Z`) - from) / DAY_MS) + 1;
  const lines = ["patient_key,sex,age_years,birth_date,collected_at,value,unit,setting,flags"];
  for (let p = 1; p <= data.patients; p++) {
    const key = `${data.keyPrefix}-${String(p).padStart(6, "0")}`;
    const sex = draws.uniform() < 0.55 ? "F" : "M";
    const age = 18 + 72 * draws.uniform();
    const setting = pick(data.settings, draws.uniform());
    const u = draws.uniform();
    const kind: Draw = u < setting.low ? data.low : u < setting.low + setting.high ? data.high : data.nonDiseased;
    const u2 = draws.uniform();
    const results = u2 < 0.7 ? 1 : u2 < 0.92 ? 2 : 3;
    let day = Math.floor(draws.uniform() * days);
    for (let r = 0; r < results && day < days; r++) {
      const minutes = 7 * 60 + Math.floor(draws.uniform() * 10 * 60);
      const value = kind(draws);
      const shown = value < data.lowerLimit ? `<${data.lowerLimit.toFixed(data.decimals)}` : value.toFixed(data.decimals);
      const flag = pick([...data.flags, { name: "", share: 1 }], draws.uniform()).name;
      const ageAt = (age + day / 365.25).toFixed(1);
      lines.push(`${key},${sex},${ageAt},,${isoDateTime(from + day * DAY_MS + minutes * 60_000)},${shown},,${setting.name},${flag}`);
      day += 20 + Math.floor(draws.uniform() * 120);
    }
  }
  return `${lines.join("\n")}\n`;
}

/**
 * TSH in an invented hospital laboratory's system over eighteen months: non-diseased adults
 * around 1.6 m[IU]/L (lognormal, SD 0.40 on the log scale), untreated or undertreated
 * hypothyroidism above, suppressed TSH below; outpatients mostly well, inpatients and the
 * emergency department much less so.
 */
export const DEMO_TSH_ROUTINE: DemoRoutineData = {
  seed: 2617,
  keyPrefix: "PX",
  patients: 9000,
  collected: ["2025-01-06", "2026-06-30"],
  decimals: 2,
  lowerLimit: 0.01,
  nonDiseased: (d) => d.lognormal(1.6, 0.4),
  low: (d) => d.lognormal(0.08, 0.9),
  high: (d) => d.lognormal(7.5, 0.55),
  settings: [
    { name: "outpatient", share: 0.7, low: 0.03, high: 0.08 },
    { name: "inpatient", share: 0.2, low: 0.1, high: 0.25 },
    { name: "emergency", share: 0.1, low: 0.08, high: 0.2 },
  ],
  flags: [
    { name: "haemolysed", share: 0.015 },
    { name: "lipaemic", share: 0.008 },
  ],
};
