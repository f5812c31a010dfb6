/**
 * lib/xlsx/streamed-workbook.ts, the one writer of Bellwether's workbooks, read back as raw
 * SpreadsheetML (not through exceljs): text that a spreadsheet program would take for a formula
 * (OWASP, "CSV Injection": a leading =, +, -, @, tab or carriage return; common practice) is a
 * shared-string cell (type "s", plain text; not "str", a formula's result) with the Text format
 * "@" (numFmtId 49), never a formula; numbers stay numbers.
 */
import { describe, expect, it } from "vitest";
import { addRow, streamedWorkbook, tableSheet } from "@/lib/xlsx/streamed-workbook";
import { FORMULA_START, xlsxCells } from "../support/xlsx-xml";

const HOSTILE = [
  "=cmd|' /C calc'!A0",
  "=1+1",
  "+SUM(1,1)",
  "-2+3",
  "@SUM(A1:A2)",
  "\t=1+1",
  "\r=1+1",
  '=HYPERLINK("http://example.invalid","x")',
  "=", // one character
  "-", // a minus alone
];

describe("streamed workbooks write formula text as text", () => {
  it("writes every hostile string as a Text string cell and numbers as numbers", async () => {
    const bytes = await streamedWorkbook(new Date("2026-03-02T00:00:00Z"), (workbook) => {
      const sheet = tableSheet(workbook, "=Sheet", ["=header", "+value"]);
      for (const text of HOSTILE) addRow(sheet, [text, -1.5]);
      addRow(sheet, [null, 0]);
      sheet.commit();
    });
    const cells = xlsxCells(bytes);
    expect(cells.filter((c) => c.formula)).toEqual([]);
    const texts = cells.filter((c) => c.type !== "n");
    expect(texts.map((c) => c.text.replace(/\r/g, "\n"))).toEqual(["=header", "+value", ...HOSTILE.map((t) => t.replace(/\r/g, "\n"))]);
    for (const c of texts) {
      expect(FORMULA_START.test(c.text), c.text).toBe(true);
      expect({ type: c.type, numFmtId: c.numFmtId }, JSON.stringify(c.text)).toEqual({ type: "s", numFmtId: 49 });
    }
    expect(cells.filter((c) => c.type === "n").map((c) => Number(c.text))).toEqual([...HOSTILE.map(() => -1.5), 0]);
  });
});
