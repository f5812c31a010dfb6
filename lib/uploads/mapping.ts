/**
 * Which column of the file holds each template column: the template's own header (any case)
 * unless the caller's mapping names another header. Refuses, with the file's headers in the
 * error's details, a mapping that names an unknown template column or a header the file lacks,
 * and a result without donor_code, sex, value or any complete age form.
 */
import { ROUTINE_COLUMNS, TEMPLATE_COLUMNS, UPLOAD_COLUMNS, type ColumnMapping, type ColumnSet, type UploadColumn } from "./columns";
import { UploadError } from "./errors";
import { quoted } from "./values";

/** For each column of the set read, the file's header that holds it, or null. */
export type ResolvedMapping = Partial<Record<UploadColumn, string | null>>;

export interface ResolvedColumns {
  mapping: ResolvedMapping;
  /** Index into a row's cells for every upload column, −1 when unmapped or not in the set read. */
  index: Record<UploadColumn, number>;
}

/** Whether the set is the routine-results one (indirect studies). */
export function isRoutineSet(columns: ColumnSet): boolean {
  return columns === ROUTINE_COLUMNS || columns.includes("patient_key");
}

/** Headers listed in a message; a file with more is summarised ("… and 480 more"). */
const LISTED_HEADERS = 20;

function list(items: readonly string[]): string {
  const shown = items.slice(0, LISTED_HEADERS).map(quoted).join(", ");
  return items.length > LISTED_HEADERS ? `${shown} and ${items.length - LISTED_HEADERS} more` : shown;
}

/**
 * Matches the file's headers to the template's columns (the mapping first, then the template's
 * own names) without requiring any column: refuses only a mapping that names an unknown template
 * column, a header the file lacks, or one header for two columns.
 */
export function matchColumns(headers: readonly string[], mapping: ColumnMapping = {}, columns: ColumnSet = TEMPLATE_COLUMNS): ResolvedColumns {
  const details = { headers: [...headers] };
  const known = new Set<string>(columns);
  for (const key of Object.keys(mapping)) {
    if (!known.has(key)) {
      throw new UploadError(
        "mapping",
        `the mapping names ${quoted(key)}, which is not a template column (${columns.join(", ")})`,
        details,
      );
    }
  }
  const find = (header: string): number => {
    const exact = headers.indexOf(header);
    if (exact !== -1) return exact;
    const lower = header.trim().toLowerCase();
    return headers.findIndex((h) => h.toLowerCase() === lower);
  };
  const index = Object.fromEntries(UPLOAD_COLUMNS.map((c) => [c, -1])) as Record<UploadColumn, number>;
  const resolved = {} as ResolvedMapping;
  const claimedBy = new Map<number, UploadColumn>();
  for (const column of columns) {
    const wanted = mapping[column];
    let i: number;
    if (wanted !== undefined && wanted !== null && wanted !== "") {
      i = find(wanted);
      if (i === -1) {
        throw new UploadError(
          "mapping",
          `the mapping gives the header ${quoted(wanted)} for ${column}, but the file has no such header (its headers: ${list(headers)})`,
          details,
        );
      }
      const other = claimedBy.get(i);
      if (other !== undefined && mapping[other] !== undefined) {
        throw new UploadError("mapping", `the mapping gives the header ${quoted(headers[i])} to both ${other} and ${column}`, details);
      }
    } else {
      i = find(column);
      // A header the mapping gave to another column is not also read under its own name.
      if (i !== -1 && claimedBy.has(i)) i = -1;
    }
    if (i !== -1) claimedBy.set(i, column);
    index[column] = i;
    resolved[column] = i === -1 ? null : headers[i];
  }
  // A header claimed by its own name before the mapping gave it to a later column.
  for (const column of columns) {
    const i = index[column];
    if (i !== -1 && claimedBy.get(i) !== column) {
      index[column] = -1;
      resolved[column] = null;
    }
  }
  // A header read for a column must name one column of the file: with two "value" columns,
  // reading the first would be a silent guess.
  for (const column of columns) {
    const i = index[column];
    if (i === -1) continue;
    const name = headers[i].trim().toLowerCase();
    const same = headers.flatMap((h, k) => (h.trim().toLowerCase() === name ? [k + 1] : []));
    if (same.length > 1) {
      throw new UploadError(
        "mapping",
        `the header ${quoted(headers[i])} appears in columns ${same.slice(0, -1).join(", ")} and ${same[same.length - 1]}; rename one of them so that each column is read from one header`,
        details,
      );
    }
  }
  return { mapping: resolved, index };
}

/**
 * Why the matched columns cannot be read as donor results (donor_code, sex, value or every
 * complete age form unmapped), or as routine results (patient_key, sex, value, collected_at, or
 * both age_years and birth_date unmapped), as the refusal that checking would throw; null when
 * complete.
 */
export function incompleteMapping(headers: readonly string[], index: ResolvedColumns["index"], columns: ColumnSet = TEMPLATE_COLUMNS): UploadError | null {
  const details = { headers: [...headers] };
  const routine = isRoutineSet(columns);
  const required = routine ? (["patient_key", "sex", "collected_at", "value"] as const) : (["donor_code", "sex", "value"] as const);
  const missing = required.filter((c) => index[c] === -1);
  if (missing.length > 0) {
    return new UploadError(
      "mapping",
      `no column of the file is mapped to ${missing.join(", ")}; name the file's header for ${missing.length === 1 ? "it" : "each"} in the mapping (its headers: ${list(headers)})`,
      details,
    );
  }
  if (routine && index.age_years === -1 && index.birth_date === -1) {
    return new UploadError(
      "mapping",
      `no column of the file is mapped to the age; map age_years, or birth_date (the age is then taken at collected_at) (its headers: ${list(headers)})`,
      details,
    );
  }
  if (!routine && index.age_years === -1 && (index.birth_date === -1 || index.collected_on === -1)) {
    return new UploadError(
      "mapping",
      `no column of the file is mapped to the age; map age_years, or both birth_date and collected_on (its headers: ${list(headers)})`,
      details,
    );
  }
  return null;
}

/** {@link matchColumns}, refusing a result that cannot be read as the set's results. */
export function resolveColumns(headers: readonly string[], mapping: ColumnMapping = {}, columns: ColumnSet = TEMPLATE_COLUMNS): ResolvedColumns {
  const resolved = matchColumns(headers, mapping, columns);
  const refusal = incompleteMapping(headers, resolved.index, columns);
  if (refusal) throw refusal;
  return resolved;
}
