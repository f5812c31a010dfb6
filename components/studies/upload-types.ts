/**
 * The shapes of the upload routes' answers as the upload panel reads them (see DEVELOPERS.md,
 * "Study pages"). Components do not import lib/uploads' server code, only these plain types.
 */
export const TEMPLATE_COLUMNS = ["donor_code", "sex", "age_years", "birth_date", "collected_on", "value", "unit"] as const;
export type TemplateColumn = (typeof TEMPLATE_COLUMNS)[number];
/** An indirect study's routine-results columns (lib/uploads' ROUTINE_COLUMNS). */
export const ROUTINE_COLUMNS = ["patient_key", "sex", "age_years", "birth_date", "collected_at", "value", "unit", "setting", "flags"] as const;
export type UploadColumn = TemplateColumn | (typeof ROUTINE_COLUMNS)[number];

/** Template column → the file's header (absent: not in the file). */
export type ColumnMapping = Partial<Record<UploadColumn, string>>;

/** POST …/uploads/preview. */
export interface UploadPreviewAnswer {
  fileName: string;
  sizeBytes: number;
  format: "csv" | "xlsx";
  separator: "," | ";" | null;
  sheet: string | null;
  sheets: string[];
  headers: string[];
  matchesTemplate: boolean;
  suggested: ColumnMapping;
  /** One key per column of the set the study reads (the donor template's, or the routine results'). */
  mapping: Partial<Record<UploadColumn, string | null>>;
  incomplete: string | null;
  rows: { row: number; cells: Partial<Record<UploadColumn, string | null>> }[];
  fileRows: { row: number; cells: string[] }[];
}

export interface UploadProblem {
  row: number;
  column: UploadColumn;
  message: string;
}

/** POST …/uploads (201), and the last line of its NDJSON variant. */
export interface PendingUploadAnswer {
  id: string;
  status: "pending";
  rows: { total: number; valid: number; invalid: number };
  problems: UploadProblem[];
  problemsOmitted: number;
  fileName: string;
  sha256: string;
  sizeBytes: number;
  format: "csv" | "xlsx";
  sheet: string | null;
  headers: string[];
  mapping: Partial<Record<UploadColumn, string | null>>;
}

/** A problem+json answer, with the upload refusal's extensions when present. */
export interface ProblemAnswer {
  status: number;
  title?: string;
  detail: string;
  uploadError?: string;
  headers?: string[];
  sheets?: string[];
}

/** One upload of the study as the page lists it. */
export interface UploadSummary {
  id: string;
  fileName: string;
  status: "pending" | "committed" | "cancelled";
  rows: { total: number; valid: number; invalid: number };
  stored: number | null;
  uploadedAt: string;
}

/** What the columns need before a file can be checked; null when the mapping is complete. */
export function mappingGap(mapping: ColumnMapping, routine = false): string | null {
  const required = routine ? (["patient_key", "sex", "collected_at", "value"] as const) : (["donor_code", "sex", "value"] as const);
  const missing = required.filter((c) => !mapping[c]);
  if (missing.length > 0) return `Choose the file's column for ${missing.join(", ")}.`;
  if (routine && !mapping.age_years && !mapping.birth_date) return "Choose the column for age_years, or birth_date.";
  if (!routine && !mapping.age_years && !(mapping.birth_date && mapping.collected_on)) {
    return "Choose the column for age_years, or both birth_date and collected_on.";
  }
  const used = Object.values(mapping).filter(Boolean);
  const twice = used.find((h, i) => used.indexOf(h) !== i);
  if (twice) return `The column "${twice}" is chosen for two template columns; each file column holds one.`;
  return null;
}
