import { describe, expect, it } from "vitest";
import { checkUpload, previewUpload, UploadError, type ColumnMapping } from "@/lib/uploads";

// Header mapping and the preview, from the requirement: mapping is template column → file
// header; unknown targets, and a mapping leaving donor_code, sex, value or every age form
// unmapped, are refused with a clear message; the preview shows headers and the first N rows.

const LAB_EXPORT = Buffer.from(
  "Patient ID;Gender;Age (y);Result;Units;Comment\n" +
    "P-1;F;30;4,5;mmol/L;fasting\n" +
    "P-2;M;40;5,1;;\n" +
    "P-3;F;50;4,9;;\n",
);
const MAPPING: ColumnMapping = { donor_code: "Patient ID", sex: "Gender", age_years: "Age (y)", value: "Result", unit: "Units" };

async function mappingRefusal(mapping: ColumnMapping | undefined, bytes = LAB_EXPORT): Promise<[string, string, string[] | undefined]> {
  try {
    await checkUpload(bytes, { unit: "mmol/L", mapping, decimalComma: true });
  } catch (error) {
    if (!(error instanceof UploadError)) throw error;
    return [error.code, error.message, error.details.headers];
  }
  throw new Error("the mapping was not refused");
}

function without(column: keyof ColumnMapping): ColumnMapping {
  return Object.fromEntries(Object.entries(MAPPING).filter(([key]) => key !== column));
}

const HEADERS = ["Patient ID", "Gender", "Age (y)", "Result", "Units", "Comment"];

describe("mapping", () => {
  it("reads the file's headers as the template's columns", async () => {
    const report = await checkUpload(LAB_EXPORT, { unit: "mmol/L", mapping: MAPPING, decimalComma: true });
    expect(report.headers).toEqual(HEADERS);
    expect(report.mapping).toEqual({
      donor_code: "Patient ID",
      sex: "Gender",
      age_years: "Age (y)",
      birth_date: null,
      collected_on: null,
      value: "Result",
      unit: "Units",
    });
    expect(report.problems).toEqual([]);
    expect(report.validRows.map((r) => [r.row, r.donorCode, r.sex, r.ageYears, r.value])).toEqual([
      [1, "P-1", "F", 30, 4.5],
      [2, "P-2", "M", 40, 5.1],
      [3, "P-3", "F", 50, 4.9],
    ]);
  });

  it("matches the template's own headers in any case without a mapping", async () => {
    const report = await checkUpload(Buffer.from("Donor_Code,SEX,Age_Years,Value\nD1,F,30,1\n"), { unit: "mmol/L" });
    expect(report.validRows.map((r) => r.donorCode)).toEqual(["D1"]);
  });

  it("refuses an unknown template column", async () => {
    expect(await mappingRefusal({ ...MAPPING, patient: "Patient ID" } as ColumnMapping)).toEqual([
      "mapping",
      'the mapping names "patient", which is not a template column (donor_code, sex, age_years, birth_date, collected_on, value, unit)',
      HEADERS,
    ]);
  });

  it("refuses a header the file does not have", async () => {
    expect(await mappingRefusal({ ...MAPPING, value: "Result (mmol/L)" })).toEqual([
      "mapping",
      'the mapping gives the header "Result (mmol/L)" for value, but the file has no such header (its headers: "Patient ID", "Gender", "Age (y)", "Result", "Units", "Comment")',
      HEADERS,
    ]);
  });

  it("refuses one header for two columns", async () => {
    expect((await mappingRefusal({ ...MAPPING, unit: "Result" }))[1]).toBe('the mapping gives the header "Result" to both value and unit');
  });

  it("refuses a mapping that leaves donor_code, sex or value unmapped", async () => {
    expect(await mappingRefusal(undefined)).toEqual([
      "mapping",
      'no column of the file is mapped to donor_code, sex, value; name the file\'s header for each in the mapping (its headers: "Patient ID", "Gender", "Age (y)", "Result", "Units", "Comment")',
      HEADERS,
    ]);
    expect((await mappingRefusal(without("sex")))[1]).toBe(
      'no column of the file is mapped to sex; name the file\'s header for it in the mapping (its headers: "Patient ID", "Gender", "Age (y)", "Result", "Units", "Comment")',
    );
  });

  it("refuses a mapping without any age form, or with only one of the two dates", async () => {
    const message =
      'no column of the file is mapped to the age; map age_years, or both birth_date and collected_on (its headers: "Patient ID", "Gender", "Age (y)", "Result", "Units", "Comment")';
    expect((await mappingRefusal(without("age_years")))[1]).toBe(message);
    expect((await mappingRefusal({ ...without("age_years"), birth_date: "Age (y)" }))[1]).toBe(message);
  });
});

describe("previewUpload", () => {
  it("returns the headers and the first rows with the mapping applied, unchecked", async () => {
    const preview = await previewUpload(LAB_EXPORT, { mapping: MAPPING, rows: 2 });
    expect(preview).toMatchObject({ format: "csv", separator: ";", sheet: null, sheets: [], headers: HEADERS });
    expect(preview.rows).toEqual([
      { row: 1, cells: { donor_code: "P-1", sex: "F", age_years: "30", birth_date: null, collected_on: null, value: "4,5", unit: "mmol/L" } },
      { row: 2, cells: { donor_code: "P-2", sex: "M", age_years: "40", birth_date: null, collected_on: null, value: "5,1", unit: "" } },
    ]);
  });

  it("gives the file's headers with a refused mapping, for the mapping form", async () => {
    const refusal = await previewUpload(LAB_EXPORT).catch((error: unknown) => error);
    expect(refusal).toBeInstanceOf(UploadError);
    expect((refusal as UploadError).code).toBe("mapping");
    expect((refusal as UploadError).details.headers).toEqual(HEADERS);
  });
});
