/**
 * The one way Bellwether writes an XLSX workbook: exceljs's streaming writer, rows committed as
 * they are added, and text that is never a formula. Every string goes in as a string cell
 * (exceljs makes a formula only from a `{formula}` object, never from text) and carries the Text
 * number format "@", so that a value such as `=cmd|' /C calc'!A0`, `+1`, `-x` or `@SUM(…)` stays
 * text even when someone edits the cell in a spreadsheet program. Strings are shared strings
 * (cell type "s"): without them exceljs writes cell type "str", which SpreadsheetML defines as
 * the text result of a formula (ECMA-376 Part 1, §18.18.11 ST_CellType), a door left ajar for
 * a reader that takes it as one. Strings keep their exact characters (a bare carriage return
 * reads back as a line feed: XML's end-of-line rule).
 */
import { PassThrough } from "node:stream";
import ExcelJS from "exceljs";

export type CellValue = string | number | boolean | Date | null;
export type WorkbookWriter = ExcelJS.stream.xlsx.WorkbookWriter;
export type Worksheet = ExcelJS.Worksheet;

const TEXT_FORMAT = "@";

/**
 * Adds a row and commits it (the workbook is streamed, so a 200,000-row sheet never sits in
 * memory as cells), marking every text cell as Text so that it can never be taken for a formula.
 */
export function addRow(sheet: Worksheet, values: readonly CellValue[], bold = false): void {
  const row = sheet.addRow(values as CellValue[]);
  for (let i = 0; i < values.length; i++) {
    if (typeof values[i] === "string") {
      const cell = row.getCell(i + 1);
      cell.numFmt = TEXT_FORMAT;
      if (bold) cell.font = { bold: true };
    }
  }
  if (bold && typeof values[0] !== "string") row.getCell(1).font = { bold: true };
  row.commit();
}

/** A sheet whose first row, the header, stays in view. */
export function tableSheet(workbook: WorkbookWriter, name: string, names: readonly string[]): Worksheet {
  const sheet = workbook.addWorksheet(name, { views: [{ state: "frozen", ySplit: 1 }] });
  addRow(sheet, names, true);
  return sheet;
}

/** The bytes of a workbook that `build` fills (committing each sheet it adds). */
export async function streamedWorkbook(created: Date, build: (workbook: WorkbookWriter) => void): Promise<Buffer> {
  const stream = new PassThrough();
  const chunks: Buffer[] = [];
  stream.on("data", (chunk: Buffer) => chunks.push(chunk));
  const ended = new Promise<void>((resolve, reject) => {
    stream.on("end", resolve);
    stream.on("error", reject);
  });
  const workbook = new ExcelJS.stream.xlsx.WorkbookWriter({ stream, useStyles: true, useSharedStrings: true });
  workbook.creator = "Bellwether";
  workbook.created = created;
  build(workbook);
  await workbook.commit();
  await ended;
  return Buffer.concat(chunks);
}
