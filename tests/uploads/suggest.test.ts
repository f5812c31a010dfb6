import { describe, expect, it } from "vitest";
import { inspectUpload, previewUpload, suggestMapping, UploadError } from "@/lib/uploads";

// The mapping guess and the inspection the preview route answers with. Expected mappings are
// common practice in laboratory exports, no source.

describe("suggestMapping", () => {
  it("maps the headers laboratory exports commonly use, ignoring case, spaces and signs", () => {
    expect(suggestMapping(["Sample ID", "Gender", "Date of birth", "Drawn on", "Fasting glucose", "Units"])).toEqual({
      donor_code: "Sample ID",
      sex: "Gender",
      birth_date: "Date of birth",
      collected_on: "Drawn on",
      unit: "Units",
    });
    expect(suggestMapping(["DOB", "AGE (y)", "Result", "patient_id", "SEX"])).toEqual({
      donor_code: "patient_id",
      sex: "SEX",
      age_years: "AGE (y)",
      birth_date: "DOB",
      value: "Result",
    });
  });

  it("takes the template's own names first and never gives one header to two columns", () => {
    expect(suggestMapping(["id", "value", "result", "date", "collected_on", "sex"])).toEqual({
      donor_code: "id",
      sex: "sex",
      collected_on: "collected_on",
      value: "value",
    });
  });
});

describe("inspectUpload", () => {
  const file = Buffer.from("Code,Gender,Age,Result\nC1,F,30,4.4\nC2,M,41,5.0\n");

  it("applies the guess when asked, and gives the rows as the file has them", async () => {
    const inspection = await inspectUpload(file, { suggest: true });
    expect(inspection.mapping).toEqual({ donor_code: "Code", sex: "Gender", age_years: "Age", birth_date: null, collected_on: null, value: "Result", unit: null });
    expect(inspection.incomplete).toBeNull();
    expect(inspection.matchesTemplate).toBe(false);
    expect(inspection.fileRows).toEqual([
      { row: 1, cells: ["C1", "F", "30", "4.4"] },
      { row: 2, cells: ["C2", "M", "41", "5.0"] },
    ]);
  });

  it("says what is missing instead of refusing, where previewUpload refuses", async () => {
    const inspection = await inspectUpload(file);
    expect(inspection.incomplete).toBe(
      `no column of the file is mapped to donor_code, sex, value; name the file's header for each in the mapping (its headers: "Code", "Gender", "Age", "Result")`,
    );
    const refusal = await previewUpload(file).catch((e: unknown) => e);
    expect(refusal).toBeInstanceOf(UploadError);
    expect((refusal as UploadError).message).toBe(inspection.incomplete);
  });
});
