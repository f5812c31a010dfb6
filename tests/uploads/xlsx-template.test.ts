import { readFileSync } from "node:fs";
import path from "node:path";
import { Readable } from "node:stream";
import ExcelJS from "exceljs";
import { describe, expect, it } from "vitest";
import { checkUpload, previewUpload, templateCsv, templateXlsx, UploadError } from "@/lib/uploads";

// excel-style.xlsx is written by scripts/fixtures/uploads-xlsx.py as raw SpreadsheetML in the
// part order Excel saves (worksheets before shared strings and styles), not by exceljs; its
// rows are described in that script. Expectations from the requirement: formulas read as their
// saved result, dates from date cells, the first sheet unless another is named.

const workbook = readFileSync(path.join(__dirname, "../fixtures/uploads/excel-style.xlsx"));

describe("checkUpload: XLSX", () => {
  it("reads the named sheet: numbers, date cells, saved formula results, text results", async () => {
    const report = await checkUpload(workbook, { unit: "mmol/L", sheet: "Donors" });
    expect(report).toMatchObject({ format: "xlsx", sheet: "Donors", separator: null });
    expect(report.validRows.map((r) => [r.row, r.donorCode, r.sex, r.ageYears, r.collectedOn, r.value, r.censoring])).toEqual([
      [1, "X1", "F", 34.5, "2026-03-02", 4.25, null],
      // birth 1990-02-28 and collection 2026-03-02 as date cells; value =B9*2 saved as 5.5.
      [2, "X2", "M", 36 + 2 / 365, "2026-03-02", 5.5, null],
      [3, "X3", "M", 50, null, 0.5, { side: "below", inclusive: false }],
    ]);
    expect(report.validRows[1].ageDays).toBe(13151); // Python: (date(2026,3,2) - date(1990,2,28)).days
    expect(report.validRows[1].birthDate).toBe("1990-02-28");
  });

  it("reads a merged range as its top-left cell, and a formula saved without a result as empty", async () => {
    const report = await checkUpload(workbook, { unit: "mmol/L", sheet: "Donors" });
    expect(report.problems).toEqual([
      { row: 4, column: "sex", message: "sex is missing" }, // B4:B5 merged; B5 has no value of its own
      { row: 5, column: "value", message: "value is missing" }, // =A1/0 with no saved result
    ]);
    expect(report.rows).toEqual({ total: 5, valid: 3, invalid: 2 });
  });

  it("reads the first sheet in tab order by default", async () => {
    const refusal = await checkUpload(workbook, { unit: "mmol/L" }).catch((error: unknown) => error);
    expect(refusal).toBeInstanceOf(UploadError);
    expect((refusal as UploadError).details.headers).toEqual(["Collected at the invented Harrowmere clinic, spring 2026"]);
  });

  it("refuses an unknown sheet, listing the sheets", async () => {
    const refusal = await checkUpload(workbook, { unit: "mmol/L", sheet: "Results" }).catch((error: unknown) => error);
    expect(refusal).toBeInstanceOf(UploadError);
    expect((refusal as UploadError).code).toBe("unknown_sheet");
    expect((refusal as UploadError).status).toBe(422);
    expect((refusal as UploadError).message).toBe('the workbook has no sheet "Results"; its sheets are "Notes", "Donors"');
    expect((refusal as UploadError).details.sheets).toEqual(["Notes", "Donors"]);
  });

  it("reads a workbook from a stream, reporting progress up to the whole file", async () => {
    const seen: { rowsChecked: number; bytesRead: number; totalBytes: number }[] = [];
    const report = await checkUpload(Readable.from([workbook.subarray(0, 1000), workbook.subarray(1000)]), {
      unit: "mmol/L",
      sheet: "Donors",
      onProgress: (p) => seen.push({ ...p }),
    });
    expect(report.rows.total).toBe(5);
    expect(seen[seen.length - 1]).toEqual({ rowsChecked: 5, bytesRead: workbook.byteLength, totalBytes: workbook.byteLength });
  });

  it("previews a sheet with every sheet's name", async () => {
    const preview = await previewUpload(workbook, { sheet: "Donors", rows: 1 });
    expect(preview).toMatchObject({ format: "xlsx", sheet: "Donors", sheets: ["Notes", "Donors"] });
    expect(preview.rows).toEqual([
      { row: 1, cells: { donor_code: "X1", sex: "F", age_years: "34.5", birth_date: "", collected_on: "2026-03-02", value: "4.25", unit: "" } },
    ]);
  });
});

describe("blank templates", () => {
  it("writes the CSV template: the header row and the example row", () => {
    expect(templateCsv({ unit: "mmol/L" })).toBe(
      "donor_code,sex,age_years,birth_date,collected_on,value,unit\r\nEXAMPLE,F,42,,2026-03-02,4.5,mmol/L\r\n",
    );
    expect(templateCsv({ unit: "10*9/L", exampleValue: 7 })).toBe(
      "donor_code,sex,age_years,birth_date,collected_on,value,unit\r\nEXAMPLE,F,42,,2026-03-02,7,10*9/L\r\n",
    );
  });

  it("refuses the example row when the template comes back unchanged (CSV and XLSX)", async () => {
    const example = [{ row: 1, column: "donor_code", message: "this is the template's example row; delete it before uploading" }];
    const fromCsv = await checkUpload(Buffer.from(templateCsv({ unit: "mmol/L" })), { unit: "mmol/L" });
    expect(fromCsv.problems).toEqual(example);
    const fromXlsx = await checkUpload(await templateXlsx({ unit: "mmol/L" }), { unit: "mmol/L" });
    expect(fromXlsx.problems).toEqual(example);
    expect(fromXlsx.sheet).toBe("Donor results");
  });

  it("reads a filled-in XLSX template, the example row deleted", async () => {
    const book = new ExcelJS.Workbook();
    await book.xlsx.load((await templateXlsx({ unit: "mmol/L" })) as unknown as ArrayBuffer);
    const sheet = book.getWorksheet("Donor results")!;
    expect(sheet.getRow(1).font?.bold).toBe(true);
    expect(sheet.getCell("A2").note).toBeDefined();
    expect(sheet.getRow(2).font?.italic).toBe(true);
    sheet.spliceRows(2, 1);
    sheet.addRow(["H-001", "M", null, new Date(Date.UTC(1980, 4, 17)), new Date(Date.UTC(2026, 2, 2)), 5.2, null]);
    const filled = Buffer.from(await book.xlsx.writeBuffer());
    const report = await checkUpload(filled, { unit: "mmol/L" });
    expect(report.problems).toEqual([]);
    expect(report.validRows).toEqual([
      {
        row: 1,
        donorCode: "H-001",
        sex: "M",
        // Python: (date(2026,3,2) - date(1980,5,17)).days == 16725; 45 birthdays passed, the last
        // 2025-05-17, 289 days before collection, 365 days to the next.
        ageYears: expect.closeTo(45 + 289 / 365, 12),
        ageDays: 16725,
        ageFrom: "dates",
        birthDate: "1980-05-17",
        collectedOn: "2026-03-02",
        value: 5.2,
        censoring: null,
        unit: "mmol/L",
        conversion: null,
        // The routine-results fields (lib/uploads/check.ts's DonorRow): null for a healthy-donor file.
        collectedAt: null,
        setting: null,
        flags: null,
      },
    ]);
  });
});
