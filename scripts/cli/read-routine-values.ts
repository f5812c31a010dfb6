/**
 * The `value` column of a routine-results CSV, read for `bellwether indirect`: numbers, and
 * censored results written as the laboratory reports them ("<0.5", "<=0.5", ">1000", ">=1000").
 *
 * The file contract is `estimate`'s (scripts/cli/read-values.ts: header row, `value` column in
 * any case, delimiter and line ending as Papa Parse detects them, quoted fields, byte-order mark,
 * blank lines skipped). A file of plain numbers goes through the fast scanner; a file with a
 * censored value (or anything else the scanner leaves to Papa Parse) is read row by row here.
 */
import Papa from "papaparse";
import type { RoutineValue } from "../../lib/stats/indirect-cells";
import { CliError } from "./cli-error";
import { scanValues } from "./read-values";

/** One cell: a number, a censored value, or null when it is neither. */
export function parseRoutineCell(raw: string): RoutineValue | null {
  const text = raw.trim();
  if (text === "") return null;
  const c = text[0];
  if (c === "<" || c === ">") {
    const rest = text.slice(text[1] === "=" ? 2 : 1).trim();
    const v = rest === "" ? Number.NaN : Number(rest);
    return Number.isFinite(v) ? { value: v, side: c === "<" ? "below" : "above" } : null;
  }
  const v = Number(text);
  return Number.isFinite(v) ? v : null;
}

/** Values of the `value` column, censored ones as `{ value, side }`; errors name the file line. */
export function readRoutineValues(text: string, file: string): RoutineValue[] {
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const fast = scanValues(body);
  if (fast !== null) return fast;
  if (body.trim() === "") throw new CliError(`${file} is empty`);
  const parsed = Papa.parse<Record<string, string>>(body, {
    header: true,
    skipEmptyLines: "greedy",
    transformHeader: (h: string) => h.trim(),
  });
  const fields = parsed.meta.fields ?? [];
  const column = fields.find((f) => f.toLowerCase() === "value");
  if (column === undefined) {
    throw new CliError(`${file} has no "value" column (columns: ${fields.join(", ") || "none"})`);
  }
  const broken = parsed.errors.find((e) => e.type !== "FieldMismatch" && e.code !== "UndetectableDelimiter");
  if (broken) throw new CliError(`${file}: CSV error near data row ${(broken.row ?? 0) + 1}: ${broken.message}`);
  const lines = body.split(/\r\n|\n|\r/);
  const values: RoutineValue[] = [];
  let line = 1;
  for (const row of parsed.data) {
    line++;
    while (line <= lines.length && lines[line - 1].trim() === "") line++;
    const raw = (row[column] ?? "").trim();
    const v = parseRoutineCell(raw);
    if (v === null) {
      throw new CliError(`${file} line ${line}: value "${raw}" is not a number or a censored value such as "<0.5"`);
    }
    values.push(v);
  }
  if (values.length === 0) throw new CliError(`${file} has a header but no values`);
  return values;
}
