/**
 * One view of both formats: a header row, then data rows numbered from 1 as the scientist sees
 * them under the header (blank rows keep their number but are not passed on).
 */
import type { Cell } from "./columns";
import { detectSeparator, readCsvRecords } from "./csv";
import { UploadError } from "./errors";
import { cellText } from "./values";
import type { SniffedFile } from "./input";
import { readXlsxRows } from "./xlsx";

export interface TableInfo {
  format: "csv" | "xlsx";
  /** CSV only. */
  separator: "," | ";" | null;
  /** XLSX only: the sheet read, and every sheet in tab order. */
  sheet: string | null;
  sheets: string[];
  headers: string[];
}

export interface TableCallbacks {
  onHeader: (info: TableInfo) => void;
  /** Return false to stop reading. */
  onRow: (cells: readonly Cell[], row: number) => boolean | void;
  /** Bytes of the file consumed so far (for CSV, estimated from the characters parsed). */
  onBytes?: (bytesRead: number) => void;
}

export function isBlankRow(cells: readonly Cell[]): boolean {
  for (let i = 0; i < cells.length; i++) {
    const c = cells[i];
    if (c === null || c === undefined) continue;
    if (typeof c === "string" && c.trim() === "") continue;
    return false;
  }
  return true;
}

/** More columns than this in the header row and the file is refused: no donor file is that wide. */
export const MAX_COLUMNS = 1000;

function checkWidth(headers: readonly string[]): void {
  if (headers.length > MAX_COLUMNS) {
    throw new UploadError(
      "malformed",
      `the header row has ${headers.length.toLocaleString("en-US")} columns; a file of donor results has at most ${MAX_COLUMNS.toLocaleString("en-US")}`,
    );
  }
}

/** Returns whether a header row was found (false: nothing but blank rows). Throws UploadError for a header row wider than MAX_COLUMNS. */
export async function readTable(file: SniffedFile, sheet: string | undefined, callbacks: TableCallbacks): Promise<boolean> {
  let headerRow = -1;
  if (file.format === "csv") {
    const separator = detectSeparator(file.text.replace(/^(?:[ \t]*\r?\n)+/, ""));
    const bytesPerChar = file.byteLength / file.text.length;
    let record = 0;
    readCsvRecords(file.text, separator, (fields, offset) => {
      record++;
      if (headerRow === -1) {
        if (isBlankRow(fields)) return;
        headerRow = record;
        checkWidth(fields);
        callbacks.onHeader({ format: "csv", separator, sheet: null, sheets: [], headers: fields.map((f) => f.trim()) });
        return;
      }
      if ((record & 1023) === 0) callbacks.onBytes?.(Math.round(offset * bytesPerChar));
      if (isBlankRow(fields)) return;
      return callbacks.onRow(fields, record - headerRow);
    });
    callbacks.onBytes?.(file.byteLength);
    return headerRow !== -1;
  }
  let chosen: { name: string; sheets: string[] } | null = null;
  await readXlsxRows(file.bytes, sheet, {
    onSheet: (name, sheets) => {
      chosen = { name, sheets };
    },
    onBytes: callbacks.onBytes,
    onRow: (cells, rowNumber) => {
      if (headerRow === -1) {
        if (isBlankRow(cells)) return;
        headerRow = rowNumber;
        const headers = Array.from(cells, (c) => cellText(c));
        checkWidth(headers);
        const { name, sheets } = chosen ?? { name: sheet ?? "", sheets: [] };
        callbacks.onHeader({ format: "xlsx", separator: null, sheet: name, sheets, headers });
        return;
      }
      if (isBlankRow(cells)) return;
      return callbacks.onRow(cells, rowNumber - headerRow);
    },
  });
  return headerRow !== -1;
}
