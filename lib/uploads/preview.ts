/**
 * The first rows of an upload with the mapping applied, for the page where the scientist checks
 * the columns before anything is checked or stored. Cells are shown as text, unchecked.
 */
import { TEMPLATE_COLUMNS, type ColumnMapping, type ColumnSet, type UploadColumn } from "./columns";
import { collectBytes, sniffFile, type UploadInput } from "./input";
import { incompleteMapping, matchColumns, type ResolvedColumns, type ResolvedMapping } from "./mapping";
import { suggestMapping } from "./suggest";
import { readTable, type TableInfo } from "./table";
import { cellText } from "./values";
import { UploadError } from "./errors";
import { emptyRefusal } from "./check";

export interface PreviewOptions {
  mapping?: ColumnMapping;
  sheet?: string;
  /** How many data rows to return (default 20). */
  rows?: number;
  /** The columns to read: the healthy-donor template's (default) or ROUTINE_COLUMNS. */
  columns?: ColumnSet;
}

export interface UploadPreview {
  format: "csv" | "xlsx";
  separator: "," | ";" | null;
  sheet: string | null;
  /** XLSX: every sheet, in tab order. */
  sheets: string[];
  /** The file's own headers, in file order. */
  headers: string[];
  mapping: ResolvedMapping;
  rows: { row: number; cells: Partial<Record<UploadColumn, string | null>> }[];
}

export interface InspectOptions extends PreviewOptions {
  /** Without a mapping of the caller's, apply {@link suggestMapping}'s guess (default: the template's names only). */
  suggest?: boolean;
}

export interface UploadInspection extends UploadPreview {
  /** The guess for this file's headers (template column → header). */
  suggested: ColumnMapping;
  /** Whether the file's headers hold every template column under its own name. */
  matchesTemplate: boolean;
  /** Why the mapping applied cannot be read as donor results yet; null when it can. */
  incomplete: string | null;
  /** The same rows as the file has them, one text per header. */
  fileRows: { row: number; cells: string[] }[];
}

/**
 * The headers, the mapping (the caller's, the guess or the template's names) and the first rows,
 * also when the mapping is not complete yet. Throws UploadError like checkUpload for an
 * unreadable, empty or too large file, an unknown sheet, or a mapping naming what the file lacks.
 */
export async function inspectUpload(input: UploadInput, options: InspectOptions = {}): Promise<UploadInspection> {
  const limit = options.rows ?? 20;
  const columns = options.columns ?? TEMPLATE_COLUMNS;
  const file = sniffFile(await collectBytes(input));
  let info: TableInfo | null = null;
  let resolved: ResolvedColumns | null = null;
  let suggested: ColumnMapping = {};
  const rows: UploadPreview["rows"] = [];
  const fileRows: UploadInspection["fileRows"] = [];
  const found = await readTable(file, options.sheet, {
    onHeader: (table) => {
      info = table;
      suggested = suggestMapping(table.headers, columns);
      resolved = matchColumns(table.headers, options.mapping ?? (options.suggest ? suggested : undefined), columns);
    },
    onRow: (cells, row) => {
      if (rows.length >= limit) return false;
      const { index } = resolved!;
      const out: Partial<Record<UploadColumn, string | null>> = {};
      for (const column of columns) out[column] = index[column] === -1 ? null : cellText(cells[index[column]]);
      rows.push({ row, cells: out });
      fileRows.push({ row, cells: info!.headers.map((_, i) => cellText(cells[i])) });
      return rows.length < limit;
    },
  });
  if (!found || info === null) throw emptyRefusal(file.format, options.sheet);
  if (rows.length === 0 && limit > 0) throw new UploadError("no_data_rows", "the file has a header row but no data rows");
  const table = info as TableInfo;
  const lower = new Set(table.headers.map((h) => h.toLowerCase()));
  return {
    format: table.format,
    separator: table.separator,
    sheet: table.sheet,
    sheets: table.sheets,
    headers: table.headers,
    mapping: resolved!.mapping,
    rows,
    suggested,
    matchesTemplate: columns.every((c) => lower.has(c)),
    incomplete: incompleteMapping(table.headers, resolved!.index, columns)?.message ?? null,
    fileRows,
  };
}

/**
 * Like {@link inspectUpload} with the caller's mapping or the template's names, but refuses, with
 * the file's headers in `details`, a mapping that leaves a required column unmapped.
 */
export async function previewUpload(input: UploadInput, options: PreviewOptions = {}): Promise<UploadPreview> {
  const inspection = await inspectUpload(input, options);
  if (inspection.incomplete !== null) throw new UploadError("mapping", inspection.incomplete, { headers: [...inspection.headers] });
  const { format, separator, sheet, sheets, headers, mapping, rows } = inspection;
  return { format, separator, sheet, sheets, headers, mapping, rows };
}

