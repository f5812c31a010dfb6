/**
 * The first rows of an upload with the mapping applied, for the page where the scientist checks
 * the columns before anything is checked or stored. Cells are shown as text, unchecked.
 */
import { TEMPLATE_COLUMNS, type ColumnMapping, type TemplateColumn } from "./columns";
import { collectBytes, sniffFile, type UploadInput } from "./input";
import { resolveColumns, type ResolvedMapping } from "./mapping";
import { readTable, type TableInfo } from "./table";
import { cellText } from "./values";
import { UploadError } from "./errors";

export interface PreviewOptions {
  mapping?: ColumnMapping;
  sheet?: string;
  /** How many data rows to return (default 20). */
  rows?: number;
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
  rows: { row: number; cells: Record<TemplateColumn, string | null> }[];
}

/**
 * Throws UploadError like checkUpload for an unreadable, empty or too large file, an unknown
 * sheet, or a mapping it refuses; a refused mapping carries the file's headers in `details`.
 */
export async function previewUpload(input: UploadInput, options: PreviewOptions = {}): Promise<UploadPreview> {
  const limit = options.rows ?? 20;
  const file = sniffFile(await collectBytes(input));
  let info: TableInfo | null = null;
  let resolved: ReturnType<typeof resolveColumns> | null = null;
  const rows: UploadPreview["rows"] = [];
  const found = await readTable(file, options.sheet, {
    onHeader: (table) => {
      info = table;
      resolved = resolveColumns(table.headers, options.mapping);
    },
    onRow: (cells, row) => {
      if (rows.length >= limit) return false;
      const { index } = resolved!;
      const out = {} as Record<TemplateColumn, string | null>;
      for (const column of TEMPLATE_COLUMNS) out[column] = index[column] === -1 ? null : cellText(cells[index[column]]);
      rows.push({ row, cells: out });
      return rows.length < limit;
    },
  });
  if (!found || info === null) throw new UploadError("empty", "the file is empty");
  if (rows.length === 0 && limit > 0) throw new UploadError("no_data_rows", "the file has a header row but no data rows");
  const table = info as TableInfo;
  return {
    format: table.format,
    separator: table.separator,
    sheet: table.sheet,
    sheets: table.sheets,
    headers: table.headers,
    mapping: resolved!.mapping,
    rows,
  };
}
