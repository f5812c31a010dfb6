import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { checkUpload, type ConvertUnit } from "@/lib/uploads";

// Expectations come from the upload requirement (template columns, accepted forms, the problems
// to report, rows numbered from 1 under the header) and the messages documented in lib/uploads;
// ages from Python's datetime as noted beside them.

const fixture = (name: string) => readFileSync(path.join(__dirname, "../fixtures/uploads", name));
const csv = (text: string) => Buffer.from(text, "utf8");
const HEADER = "donor_code,sex,age_years,birth_date,collected_on,value,unit\n";

describe("checkUpload: the bad rows of bad-rows.csv", () => {
  it("names each problem with its row, column and message", async () => {
    const report = await checkUpload(fixture("bad-rows.csv"), { unit: "mmol/L" });
    expect(report.problems).toEqual([
      { row: 1, column: "value", message: 'value "abc" is not a number' },
      {
        row: 2,
        column: "value",
        message: 'value "4,5" has a decimal comma; if the file uses decimal commas, upload it with the decimal-comma option (decimalComma: true)',
      },
      { row: 3, column: "value", message: 'value "1e309" is too large to be a number' },
      { row: 4, column: "value", message: 'value "NaN" is not a number' },
      { row: 5, column: "value", message: 'value "Infinity" is not a number' },
      { row: 6, column: "value", message: 'value "-" is not a number' },
      { row: 7, column: "value", message: 'value "<" has a censoring sign but no limit' },
      { row: 8, column: "value", message: 'value ">>3" is not a number' },
      { row: 9, column: "value", message: "value is missing" },
      { row: 10, column: "unit", message: 'unit "mg/dL" is not the analyte\'s unit "mmol/L", and no conversion is available' },
      { row: 11, column: "sex", message: "sex is missing" },
      { row: 12, column: "sex", message: 'sex "X" is not F, M, female or male' },
      { row: 13, column: "age_years", message: "age is missing: give age_years, or birth_date and collected_on" },
      { row: 14, column: "age_years", message: "age_years -1 is negative" },
      { row: 15, column: "age_years", message: "age_years 121 is over 120 years" },
      { row: 16, column: "birth_date", message: "birth_date 2026-05-01 is after collected_on 2026-03-02" },
      { row: 17, column: "birth_date", message: 'birth_date "2024-02-31" is not a date in the calendar' },
      { row: 18, column: "birth_date", message: 'birth_date "02/03/1990" is not an ISO 8601 date (YYYY-MM-DD)' },
      { row: 19, column: "birth_date", message: "the age from birth_date and collected_on is over 120 years" },
      // Spreadsheet formula text in a CSV is only text, and so not a value.
      { row: 20, column: "value", message: "value \"=cmd|' /C calc'!A0\" is not a number" },
      // A duplicate donor code names both rows, on both rows.
      { row: 21, column: "donor_code", message: 'donor code "B21" appears in rows 21 and 22' },
      { row: 22, column: "donor_code", message: 'donor code "B21" appears in rows 21 and 22' },
      { row: 23, column: "donor_code", message: "donor_code is missing" },
      { row: 24, column: "donor_code", message: "this is the template's example row; delete it before uploading" },
      { row: 25, column: "collected_on", message: "collected_on is missing; the age is computed from birth_date and collected_on" },
    ]);
    expect(report.rows).toEqual({ total: 25, valid: 0, invalid: 25 });
    expect(report.validRows).toEqual([]);
    expect(report.problemsOmitted).toBe(0);
  });

  it("names three rows of one donor code on each of them", async () => {
    const report = await checkUpload(csv(`${HEADER}A,F,30,,,1,\nA,F,30,,,1,\nB,F,30,,,1,\nA,F,30,,,1,\n`), { unit: "mmol/L" });
    expect(report.problems.map((p) => [p.row, p.message])).toEqual([
      [1, 'donor code "A" appears in rows 1, 2 and 4'],
      [2, 'donor code "A" appears in rows 1, 2 and 4'],
      [4, 'donor code "A" appears in rows 1, 2 and 4'],
    ]);
    expect(report.rows).toEqual({ total: 4, valid: 1, invalid: 3 });
    expect(report.validRows.map((r) => r.donorCode)).toEqual(["B"]);
  });
});

describe("checkUpload: valid rows", () => {
  it("reads sex in any case, fractional ages, censored values and −0", async () => {
    const report = await checkUpload(
      csv(
        HEADER +
          "V1,f,34.5,,,4.25,\n" +
          "V2,MALE,40,,,<0.5,\n" +
          "V3,Female,41,,,<=0.5,mmol/L\n" +
          "V4,m,42,,,>1000,\n" +
          "V5,F,43,,,>= 1000,\n" +
          "V6,M,-0,,,-0,\n",
      ),
      { unit: "mmol/L" },
    );
    expect(report.problems).toEqual([]);
    const rows = report.validRows;
    expect(rows.map((r) => [r.row, r.donorCode, r.sex, r.ageYears, r.value, r.censoring])).toEqual([
      [1, "V1", "F", 34.5, 4.25, null],
      [2, "V2", "M", 40, 0.5, { side: "below", inclusive: false }],
      [3, "V3", "F", 41, 0.5, { side: "below", inclusive: true }],
      [4, "V4", "M", 42, 1000, { side: "above", inclusive: false }],
      [5, "V5", "F", 43, 1000, { side: "above", inclusive: true }],
      [6, "V6", "M", 0, 0, null],
    ]);
    expect(Object.is(rows[5].value, 0)).toBe(true); // −0 reads as +0
    expect(Object.is(rows[5].ageYears, 0)).toBe(true);
    // An age in years gives days as years × 365.25, rounded: 34.5 × 365.25 = 12601.125 (by hand).
    expect(rows[0].ageDays).toBe(12601);
    expect(rows[0].ageFrom).toBe("age_years");
    // Without a unit the value is in the analyte's unit.
    expect(rows.every((r) => r.unit === "mmol/L" && r.conversion === null)).toBe(true);
  });

  it("computes the exact age from birth_date and collected_on", async () => {
    const report = await checkUpload(
      csv(HEADER + "A1,F,,1990-02-28,2026-03-02,4,\nA2,F,99,2000-02-29,2023-02-28,4,\nA3,F,,2000-02-29,2023-03-01,4,\nA4,F,,2026-03-02,2026-03-02,4,\n"),
      { unit: "mmol/L" },
    );
    expect(report.problems).toEqual([]);
    const [a1, a2, a3, a4] = report.validRows;
    // Python: (date(2026,3,2) - date(1990,2,28)).days == 13151; the last birthday 2026-02-28 was
    // 2 days before, the next is 365 days after it: 36 + 2/365.
    expect(a1.ageDays).toBe(13151);
    expect(a1.ageYears).toBeCloseTo(36 + 2 / 365, 12);
    expect(a1).toMatchObject({ ageFrom: "dates", birthDate: "1990-02-28", collectedOn: "2026-03-02" });
    // A 29 February birthday falls on 1 March in common years, and the dates win over age_years:
    // Python: (date(2023,2,28) - date(2000,2,29)).days == 8400; (date(2023,2,28) - date(2022,3,1)).days == 364.
    expect(a2.ageDays).toBe(8400);
    expect(a2.ageYears).toBeCloseTo(22 + 364 / 365, 12);
    expect(a2.ageFrom).toBe("dates");
    // Python: (date(2023,3,1) - date(2000,2,29)).days == 8401; exactly 23 years.
    expect(a3.ageDays).toBe(8401);
    expect(a3.ageYears).toBe(23);
    expect(a4.ageDays).toBe(0);
    expect(a4.ageYears).toBe(0);
  });

  it("counts data rows from 1 under the header and skips blank rows without renumbering", async () => {
    const report = await checkUpload(csv(`${HEADER}R1,F,30,,,1,\n\n,,,,,,\nR4,F,30,,,x,\n`), { unit: "mmol/L" });
    expect(report.rows).toEqual({ total: 2, valid: 1, invalid: 1 });
    expect(report.validRows[0].row).toBe(1);
    expect(report.problems).toEqual([{ row: 4, column: "value", message: 'value "x" is not a number' }]);
  });

  it("keeps spreadsheet formula text in a donor code as plain text", async () => {
    const report = await checkUpload(csv(`${HEADER}"=HYPERLINK(""x"")",F,30,,,1,\n`), { unit: "mmol/L" });
    expect(report.validRows[0].donorCode).toBe('=HYPERLINK("x")');
  });
});

describe("checkUpload: decimal commas", () => {
  it("reads semicolon-separated CRLF files with quoted fields, line breaks in quotes and decimal commas", async () => {
    const report = await checkUpload(fixture("semicolon-decimal-comma.csv"), { unit: "mmol/L", decimalComma: true });
    expect(report.separator).toBe(";");
    expect(report.problems).toEqual([]);
    expect(report.validRows.map((r) => [r.donorCode, r.sex, r.ageYears, r.value, r.censoring])).toEqual([
      ["D1", "F", 30, 4.5, null],
      ["D2", "M", 40, 5.25, null],
      ["D3; the third", "F", 41.5, 0.5, { side: "below", inclusive: false }],
      ["D4\r\nsecond line", "M", 52, 1000, { side: "above", inclusive: true }],
    ]);
  });

  it("refuses a decimal point when the file was declared to use decimal commas", async () => {
    const report = await checkUpload(csv("donor_code;sex;age_years;value\nD1;F;30;1.234\n"), { unit: "mmol/L", decimalComma: true });
    expect(report.problems).toEqual([
      { row: 1, column: "value", message: 'value "1.234" has a decimal point, but the file was declared to use decimal commas' },
    ]);
  });

  it("refuses decimal commas in ages too without the option", async () => {
    const report = await checkUpload(csv("donor_code;sex;age_years;value\nD1;F;30,5;1\n"), { unit: "mmol/L" });
    expect(report.problems).toEqual([
      {
        row: 1,
        column: "age_years",
        message: 'age_years "30,5" has a decimal comma; if the file uses decimal commas, upload it with the decimal-comma option (decimalComma: true)',
      },
    ]);
  });
});

describe("checkUpload: units", () => {
  // A stand-in for the caller's UCUM conversion: glucose mg/dL → mmol/L divides by 18.016
  // (molar mass 180.16 g/mol, from memory), and nothing else converts.
  const convertUnit: ConvertUnit = (value, from, to) => {
    if (from === "mg/dL" && to === "mmol/L") return value / 18.016;
    throw new Error(`cannot convert ${from} to ${to}`);
  };

  it("converts another unit through the caller's callback and records the conversion", async () => {
    const report = await checkUpload(csv(`${HEADER}U1,F,30,,,90.08,mg/dL\nU2,F,30,,,<18.016,mg/dL\nU3,F,30,,,5,mmol/L\n`), {
      unit: "mmol/L",
      convertUnit,
    });
    expect(report.problems).toEqual([]);
    const [u1, u2, u3] = report.validRows;
    expect(u1.value).toBeCloseTo(5, 12); // 90.08 / 18.016 = 5 (by hand)
    expect(u1).toMatchObject({ unit: "mmol/L", conversion: { fromUnit: "mg/dL", value: 90.08 } });
    expect(u2.value).toBeCloseTo(1, 12);
    expect(u2.censoring).toEqual({ side: "below", inclusive: false });
    expect(u2.conversion).toEqual({ fromUnit: "mg/dL", value: 18.016 });
    expect(u3.conversion).toBeNull();
  });

  it("records a row it cannot convert as invalid with the callback's message", async () => {
    const report = await checkUpload(csv(`${HEADER}U1,F,30,,,5,furlong\n`), { unit: "mmol/L", convertUnit });
    expect(report.problems).toEqual([{ row: 1, column: "unit", message: "cannot convert furlong to mmol/L" }]);
    expect(report.rows).toEqual({ total: 1, valid: 0, invalid: 1 });
  });
});

describe("checkUpload: progress", () => {
  it("reports rows checked and bytes read, ending with the whole file", async () => {
    const lines = Array.from({ length: 5000 }, (_, i) => `P${i},F,30,,,${i % 100},`).join("\n");
    const bytes = csv(`${HEADER}${lines}\n`);
    const seen: { rowsChecked: number; bytesRead: number; totalBytes: number }[] = [];
    await checkUpload(bytes, { unit: "mmol/L", onProgress: (p) => seen.push({ ...p }) });
    expect(seen.length).toBeGreaterThanOrEqual(3);
    for (let i = 1; i < seen.length; i++) {
      expect(seen[i].rowsChecked).toBeGreaterThanOrEqual(seen[i - 1].rowsChecked);
      expect(seen[i].bytesRead).toBeGreaterThanOrEqual(seen[i - 1].bytesRead);
    }
    expect(seen[seen.length - 1]).toEqual({ rowsChecked: 5000, bytesRead: bytes.byteLength, totalBytes: bytes.byteLength });
    expect(seen[0].rowsChecked).toBeLessThan(5000);
  });
});
