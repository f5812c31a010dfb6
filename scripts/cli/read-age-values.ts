/**
 * The `age_years` and `value` columns of a paediatric donor CSV, read for `bellwether lms`.
 * The same conventions as the `value` reader (read-values.ts): a header row, columns found by
 * name (any case, surrounding spaces ignored, the first such column), the delimiter and line
 * ending detected by Papa Parse, quoted fields, a byte-order mark, blank lines skipped, other
 * columns ignored; a cell that `Number` does not read as a finite number is refused with its
 * file line. Ages must not be negative; values must be positive (the LMS method takes logs).
 */
import Papa from "papaparse";
import { CliError } from "./cli-error";

export interface AgeValues {
  ages: number[];
  values: number[];
}

export function readAgeValues(text: string, file: string): AgeValues {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (body.trim() === "") throw new CliError(`${file} is empty`);
  const parsed = Papa.parse<Record<string, string>>(body, {
    header: true,
    skipEmptyLines: "greedy",
    transformHeader: (h: string) => h.trim(),
  });
  const fields = parsed.meta.fields ?? [];
  const find = (name: string) => fields.find((f) => f.toLowerCase() === name);
  const ageColumn = find("age_years");
  const valueColumn = find("value");
  const missing = [ageColumn === undefined ? '"age_years"' : null, valueColumn === undefined ? '"value"' : null].filter(Boolean);
  if (ageColumn === undefined || valueColumn === undefined) {
    throw new CliError(`${file} has no ${missing.join(" or ")} column (columns: ${fields.join(", ") || "none"})`);
  }
  const broken = parsed.errors.find((e) => e.type !== "FieldMismatch" && e.code !== "UndetectableDelimiter");
  if (broken) {
    throw new CliError(`${file}: CSV error near data row ${(broken.row ?? 0) + 1}: ${broken.message}`);
  }
  const ages: number[] = [];
  const values: number[] = [];
  const lines = body.split(/\r\n|\n|\r/);
  let line = 1;
  for (const row of parsed.data) {
    line++;
    while (line <= lines.length && lines[line - 1].trim() === "") line++;
    const rawAge = (row[ageColumn] ?? "").trim();
    const rawValue = (row[valueColumn] ?? "").trim();
    const age = rawAge === "" ? Number.NaN : Number(rawAge);
    const value = rawValue === "" ? Number.NaN : Number(rawValue);
    if (!Number.isFinite(age)) throw new CliError(`${file} line ${line}: age_years "${rawAge}" is not a number`);
    if (age < 0) throw new CliError(`${file} line ${line}: age_years ${rawAge} is negative`);
    if (!Number.isFinite(value)) throw new CliError(`${file} line ${line}: value "${rawValue}" is not a number`);
    if (!(value > 0)) {
      throw new CliError(`${file} line ${line}: value ${rawValue} is not positive; the LMS method needs values > 0`);
    }
    ages.push(age);
    values.push(value);
  }
  if (ages.length === 0) throw new CliError(`${file} has a header but no donors`);
  return { ages, values };
}
