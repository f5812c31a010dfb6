/**
 * Donors of an age-curve study for the tests: the 600 donors of tests/fixtures/lms/lms-cli-600.csv
 * (drawn by scripts/fixtures/lms-curves.R from known curves) written as the upload template with a
 * birth date and a collection date, so that the upload computes each exact age itself.
 */
import { readFileSync } from "node:fs";
import path from "node:path";

export const LMS_CLI_FIXTURE = path.resolve(__dirname, "..", "fixtures", "lms", "lms-cli-600.csv");
export const COLLECTED_ON = "2026-01-05";

export interface AgeValue {
  age: number;
  value: number;
}

export function fixtureDonors(file = LMS_CLI_FIXTURE): AgeValue[] {
  const [, ...lines] = readFileSync(file, "utf8").trim().split(/\r?\n/);
  return lines.map((line) => {
    const [age, value] = line.split(",").map(Number);
    return { age, value };
  });
}

/** The birth date `age` years (of 365.25 days, rounded to whole days) before `collectedOn`. */
export function birthDateFor(age: number, collectedOn = COLLECTED_ON): string {
  const t = Date.parse(`${collectedOn}T00:00:00Z`) - Math.round(age * 365.25) * 86_400_000;
  return new Date(t).toISOString().slice(0, 10);
}

/** The template CSV: donor codes P1…, sexes alternating F/M, birth and collection dates, no age_years. */
export function ageCurveCsv(donors: readonly AgeValue[], { prefix = "P", collectedOn = COLLECTED_ON } = {}): string {
  const lines = ["donor_code,sex,age_years,birth_date,collected_on,value,unit"];
  donors.forEach((d, i) => lines.push([`${prefix}${i + 1}`, i % 2 === 0 ? "F" : "M", "", birthDateFor(d.age, collectedOn), collectedOn, String(d.value), ""].join(",")));
  return `${lines.join("\n")}\n`;
}
