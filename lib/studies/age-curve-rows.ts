/**
 * What an age-curve study takes from an upload. LMS curves are continuous in age, so each donor's
 * age must be exact: computed from the birth date and the collection date (lib/uploads gives days
 * as calendar days between them). A file without those two columns is refused whole; a row that
 * gives only `age_years`, or a censored value (which the curves' likelihood cannot take), is a
 * problem of that row.
 */
import { MAX_LISTED_PROBLEMS, type UploadProblem, type ValidationReport } from "@/lib/uploads";

/** The whole-file refusal's message, when birth_date or collected_on is not mapped. */
export function missingDateColumnsMessage(missing: readonly string[]): string {
  return (
    `An age-curve study needs each donor's exact age: the file has no ${missing.map((c) => `${c} column`).join(" and no ")}. ` +
    "Map birth_date and collected_on (age in years alone is refused), or upload the results to a study of limits per partition."
  );
}

export const ROW_WITHOUT_DATES =
  "An age-curve study needs the exact age: give birth_date and collected_on (age_years alone is refused).";
export const ROW_CENSORED =
  "An age-curve study needs measured values: a censored value (< or >) cannot be placed on the curves; give the measured value or leave the row out.";

/** The birth_date and collected_on columns the report's mapping lacks (empty when both are there). */
export function missingDateColumns(report: Pick<ValidationReport, "mapping">): string[] {
  const missing: string[] = [];
  if (!report.mapping.birth_date) missing.push("birth_date");
  if (!report.mapping.collected_on) missing.push("collected_on");
  return missing;
}

/**
 * The report as an age-curve study reads it: valid rows whose age came from `age_years` or whose
 * value is censored become problems (in row order with the others, within the listed maximum).
 */
export function ageCurveReport(report: ValidationReport): ValidationReport {
  const kept = [];
  const added: UploadProblem[] = [];
  for (const row of report.validRows) {
    if (row.ageFrom !== "dates") added.push({ row: row.row, column: "birth_date", message: ROW_WITHOUT_DATES });
    else if (row.censoring !== null) added.push({ row: row.row, column: "value", message: ROW_CENSORED });
    else kept.push(row);
  }
  if (added.length === 0) return report;
  const merged = [...report.problems, ...added].sort((a, b) => a.row - b.row);
  const listed = merged.slice(0, MAX_LISTED_PROBLEMS);
  return {
    ...report,
    rows: { total: report.rows.total, valid: kept.length, invalid: report.rows.invalid + added.length },
    problems: listed,
    problemsOmitted: report.problemsOmitted + (merged.length - listed.length),
    validRows: kept,
  };
}
