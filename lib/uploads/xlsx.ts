/**
 * Rows of one sheet of an XLSX workbook through exceljs's streaming reader, so that a large
 * workbook is never held as a whole document in memory.
 *
 * - Formulas read as the result the spreadsheet saved with the file, never as formula text; a
 *   formula saved without a result (some generators do that) reads as an empty cell.
 * - Merged cells: the streaming reader does not expand merges, so a merged range reads as its
 *   top-left cell, and the other cells of the range as empty. A value merged down over several
 *   donors is therefore not copied to each: those rows are reported as missing it, rather than
 *   guessed.
 * - Rich text reads as its plain text, a hyperlink as its text, an error cell (#N/A) as its code.
 */
import { Readable } from "node:stream";
import { createInflateRaw } from "node:zlib";
import ExcelJS from "exceljs";
import type { Cell } from "./columns";
import { UploadError } from "./errors";
import { quoted } from "./values";
import { workbookInReadingOrder, zipParts } from "./zip-order";

const NOT_A_WORKBOOK = "the file is a ZIP archive but not a readable Excel workbook (.xlsx)";

/**
 * What a workbook may unpack to, all parts together. 200,000 donor rows of the template take
 * about 60-70 MB of sheet XML; a "ZIP bomb" of a few hundred KB that unpacks to gigabytes is
 * refused before the reader spends its time on it (exceljs takes about 20 s per 256 MB).
 */
export const MAX_UNPACKED_BYTES = 256 * 1024 * 1024;

/**
 * Unpacks every part once, counting the bytes and keeping none, and refuses the workbook as soon
 * as the count passes MAX_UNPACKED_BYTES. Counting the actual output, not the sizes the archive
 * declares, so that an archive lying about its sizes is caught too.
 */
async function assertUnpackedSize(file: Uint8Array): Promise<void> {
  const parts = zipParts(file);
  if (parts === null) return; // the reader decides about an archive whose directory cannot be read
  let total = 0;
  const over = () =>
    new UploadError(
      "too_large",
      `the workbook unpacks to more than ${MAX_UNPACKED_BYTES / 1024 / 1024} MB; save the donor results alone in a new workbook or as CSV`,
    );
  for (const part of parts) {
    if (part.method === 0) {
      total += part.data.byteLength;
      if (total > MAX_UNPACKED_BYTES) throw over();
      continue;
    }
    if (part.method !== 8) continue;
    await new Promise<void>((resolve, reject) => {
      const inflate = createInflateRaw();
      inflate.on("data", (chunk: Buffer) => {
        total += chunk.byteLength;
        if (total > MAX_UNPACKED_BYTES) {
          inflate.destroy();
          reject(over());
        }
      });
      inflate.on("end", resolve);
      inflate.on("error", () => resolve()); // a damaged part: the reader reports the workbook unreadable
      inflate.end(part.data);
    });
  }
}
const CHUNK = 64 * 1024;

/** exceljs's cell value shapes, as far as reading needs them. */
function toCell(v: unknown): Cell {
  if (v === null || v === undefined) return null;
  if (typeof v === "string" || typeof v === "number" || typeof v === "boolean" || v instanceof Date) return v;
  if (typeof v === "object") {
    const o = v as Record<string, unknown>;
    if ("formula" in o || "sharedFormula" in o) return toCell(o.result);
    if (Array.isArray(o.richText)) return (o.richText as { text?: string }[]).map((r) => r.text ?? "").join("");
    if ("text" in o) return toCell(o.text);
    if (typeof o.error === "string") return o.error;
  }
  return null;
}

export interface XlsxReadCallbacks {
  /** The sheet chosen and all sheet names in tab order, before its first row. */
  onSheet?: (name: string, sheets: string[]) => void;
  /** Cells of one row (index 0 = column A) and the row's number in the sheet; return false to stop. */
  onRow: (cells: Cell[], rowNumber: number) => boolean | void;
  onBytes?: (bytesRead: number) => void;
}

/**
 * Reads the first sheet (tab order), or the sheet named `sheet`.
 * Throws UploadError "unknown_sheet" (listing the sheets), "too_large" (unpacking to more than
 * MAX_UNPACKED_BYTES) or "unreadable"; rethrows what the callbacks throw.
 */
export async function readXlsxRows(file: Uint8Array, sheet: string | undefined, callbacks: XlsxReadCallbacks): Promise<void> {
  await assertUnpackedSize(file);
  const bytes = workbookInReadingOrder(file);
  let bytesRead = 0;
  const source = Readable.from(
    (function* () {
      for (let at = 0; at < bytes.byteLength; at += CHUNK) {
        const chunk = bytes.subarray(at, Math.min(at + CHUNK, bytes.byteLength));
        bytesRead += chunk.byteLength;
        callbacks.onBytes?.(bytesRead);
        yield chunk;
      }
    })(),
  );
  const reader = new ExcelJS.stream.xlsx.WorkbookReader(source, {
    worksheets: "emit",
    sharedStrings: "cache",
    styles: "cache", // needed to tell date cells from numbers
    hyperlinks: "ignore",
    entries: "ignore",
  });
  let found = false;
  let stopped = false;
  try {
    for await (const worksheet of reader) {
      const model = (reader as unknown as { model?: { sheets?: { name: string }[] } }).model;
      const sheets = (model?.sheets ?? []).map((s) => s.name);
      if (sheets.length === 0) continue;
      const wanted = sheet ?? sheets[0];
      if (!sheets.includes(wanted)) {
        throw new UploadError("unknown_sheet", `the workbook has no sheet ${quoted(wanted)}; its sheets are ${sheets.map(quoted).join(", ")}`, {
          sheets,
        });
      }
      const ws = worksheet as unknown as { name: string } & AsyncIterable<ExcelJS.Row>;
      if (ws.name !== wanted) continue;
      found = true;
      callbacks.onSheet?.(wanted, sheets);
      for await (const row of ws) {
        const cells: Cell[] = [];
        row.eachCell({ includeEmpty: false }, (cell, col) => {
          cells[col - 1] = toCell(cell.value);
        });
        if (callbacks.onRow(cells, row.number) === false) {
          stopped = true;
          break;
        }
      }
      break;
    }
  } catch (error) {
    if (error instanceof UploadError) throw error;
    throw new UploadError("unreadable", NOT_A_WORKBOOK);
  }
  if (!stopped && !found) throw new UploadError("unreadable", NOT_A_WORKBOOK);
}
