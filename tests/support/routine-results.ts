/**
 * Routine results of an indirect study for the tests: the values of an R-simulated mixture
 * (scripts/fixtures/indirect-mixtures.R, tests/fixtures/indirect-mixtures.json gives its truth)
 * written as the routine-results template, one outpatient result per patient, with extra rows of
 * known number that each cleaning step must remove: inpatient results, flagged results, repeat
 * results of the same patients, and results from before the period.
 */
import { readFileSync } from "node:fs";
import path from "node:path";

const FIXTURES = path.resolve(__dirname, "..", "fixtures");

export interface MixtureTruth {
  name: string;
  file: string;
  n: number;
  trueLower: number;
  trueUpper: number;
}

/** A mixture of tests/fixtures/indirect-mixtures.json, with its values. */
export function mixture(name: string): MixtureTruth & { values: string[] } {
  const all = JSON.parse(readFileSync(path.join(FIXTURES, "indirect-mixtures.json"), "utf8")) as MixtureTruth[];
  const m = all.find((x) => x.name === name);
  if (!m) throw new Error(`no mixture ${name}`);
  const [, ...values] = readFileSync(path.resolve(FIXTURES, "..", "..", m.file), "utf8").trim().split(/\r?\n/);
  return { ...m, values };
}

/** How many rows of each kind the file adds to the mixture's outpatient results (by construction). */
export interface RoutineExtras {
  /** Results from before `periodFrom` (each a second result of an outpatient). */
  beforePeriod: number;
  /** Inpatient results of their own patients, at three times a mixture value. */
  inpatient: number;
  /** Outpatient results flagged "haemolysed", of their own patients. */
  flagged: number;
  /** Later repeat results of outpatients (removed by "first result per patient"). */
  repeats: number;
}

export const PERIOD_FROM = "2025-02-01";

const minutes = (base: string, m: number) => new Date(Date.parse(`${base}T08:00:00Z`) + m * 60_000).toISOString().slice(0, 16);

/**
 * The CSV: every mixture value as its patient's first result within the period (outpatient,
 * unflagged), then the extras. Patient keys are P followed by a number; sexes alternate; ages
 * 20–79.
 */
export function routineResultsCsv(values: readonly string[], extras: RoutineExtras): string {
  const lines = ["patient_key,sex,age_years,collected_at,value,setting,flags"];
  const row = (key: string, i: number, at: string, value: string, setting: string, flags = "") =>
    lines.push(`${key},${i % 2 === 0 ? "F" : "M"},${20 + (i % 60)},${at},${value},${setting},${flags}`);
  values.forEach((v, i) => row(`P${i + 1}`, i, minutes("2025-03-01", i), v, "outpatient"));
  for (let k = 0; k < extras.beforePeriod; k++) row(`P${k + 1}`, k, minutes("2025-01-10", k), values[k], "outpatient");
  for (let k = 0; k < extras.repeats; k++) row(`P${k + 1}`, k, minutes("2025-09-01", k), values[(k * 7) % values.length], "outpatient");
  for (let k = 0; k < extras.inpatient; k++) row(`I${k + 1}`, k, minutes("2025-04-01", k), String(Number(values[k]) * 3), "inpatient");
  for (let k = 0; k < extras.flagged; k++) row(`H${k + 1}`, k, minutes("2025-05-01", k), values[k], "outpatient", "haemolysed");
  return `${lines.join("\n")}\n`;
}
