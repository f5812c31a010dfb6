/**
 * A one-column file of values (CSV or XLSX) → numbers, for an adoption check's 20 local values.
 * The first column of the first sheet is read; its first row is a header unless it is a number.
 * Blank rows are skipped; every other cell must be a plain number (no censoring sign).
 */
import { UploadError } from "./errors";
import { collectBytes, MAX_UPLOAD_BYTES, sniffFile, type UploadInput } from "./input";
import { readTable } from "./table";
import { cellText, readNumberText, type NumberOut } from "./values";

export interface ValueColumn {
  /** The header of the column, or null when the file starts with a value. */
  header: string | null;
  values: number[];
  /** Rows counted from 1 at the first row of the file (the header's, when there is one). */
  problems: { row: number; message: string }[];
}

/** Files of values are small: a check takes 20; more than this many rows is refused. */
export const MAX_VALUE_ROWS = 1000;

export async function readValueColumn(input: UploadInput, { decimalComma = false }: { decimalComma?: boolean } = {}): Promise<ValueColumn> {
  const bytes = await collectBytes(input);
  if (bytes.byteLength > MAX_UPLOAD_BYTES) throw new UploadError("too_large", "the file is larger than 20 MB");
  const file = sniffFile(bytes);
  const out: ValueColumn = { header: null, values: [], problems: [] };
  const number: NumberOut = { value: 0 };
  const read = (text: string, row: number) => {
    const message = readNumberText(text, decimalComma, "value", number);
    if (message === null) out.values.push(number.value);
    else out.problems.push({ row, message });
  };
  let rows = 0;
  // Cells beyond the first row's width mean the row was split where it should not have been
  // (most often a decimal comma in a comma-separated file): refused, never read as a value.
  let width = 1;
  const found = await readTable(file, undefined, {
    onHeader: ({ headers }) => {
      width = Math.max(1, headers.length - [...headers].reverse().findIndex((h) => h !== ""));
      if (headers.every((h) => h === "")) width = 1;
      const first = headers[0] ?? "";
      if (readNumberText(first, decimalComma, "value", number) === null) read(first, 1);
      else out.header = first;
    },
    onRow: (cells, row) => {
      rows++;
      if (rows > MAX_VALUE_ROWS) {
        throw new UploadError("too_many_rows", `the file has more than ${MAX_VALUE_ROWS} rows; an adoption check takes 20 values`);
      }
      const text = typeof cells[0] === "number" ? String(cells[0]) : cellText(cells[0]);
      let last = cells.length - 1;
      while (last > 0 && cellText(cells[last]) === "") last--;
      if (last + 1 > width) {
        const written = Array.from(cells.slice(0, last + 1), (c) => cellText(c)).join(file.format === "csv" ? "," : " | ");
        out.problems.push({ row: row + 1, message: `"${written}" has more cells than the first row; write one value per row with a decimal point` });
        return;
      }
      if (text === "") out.problems.push({ row: row + 1, message: "value is missing" });
      else read(text, row + 1);
    },
  });
  if (!found) throw new UploadError("empty", "the file holds no values");
  return out;
}
