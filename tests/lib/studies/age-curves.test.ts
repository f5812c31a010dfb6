import { describe, expect, it } from "vitest";
import { ageCurveReport, missingDateColumns, ROW_CENSORED, ROW_WITHOUT_DATES } from "@/lib/studies/age-curve-rows";
import { compareSexes, lmsEstimateBody, lmsPartitionDays, tableAges, thinIndices } from "@/lib/studies/age-curves";
import type { DonorRow, ValidationReport } from "@/lib/uploads";

function row(n: number, change: Partial<DonorRow> = {}): DonorRow {
  return {
    row: n, donorCode: `D${n}`, sex: "F", ageYears: 3, ageDays: 1096, ageFrom: "dates", birthDate: "2023-01-05", collectedOn: "2026-01-05",
    value: 200, censoring: null, unit: "U/L", conversion: null, ...change,
  };
}

function report(rows: DonorRow[], problems: ValidationReport["problems"] = []): ValidationReport {
  return {
    format: "csv", separator: ",", sheet: null, headers: [],
    mapping: { donor_code: "donor_code", sex: "sex", age_years: "age_years", birth_date: "birth_date", collected_on: "collected_on", value: "value", unit: "unit" },
    rows: { total: rows.length + problems.length, valid: rows.length, invalid: problems.length }, problems, problemsOmitted: 0, validRows: rows,
  };
}

describe("an age-curve study's reading of an upload", () => {
  it("turns rows with age_years only and censored values into problems of their rows, in row order", () => {
    const out = ageCurveReport(
      report([row(1), row(3, { ageFrom: "age_years", birthDate: null }), row(4, { censoring: { side: "below", inclusive: false } })], [
        { row: 2, column: "value", message: "not a number" },
      ]),
    );
    expect(out.rows).toEqual({ total: 4, valid: 1, invalid: 3 });
    expect(out.validRows.map((r) => r.row)).toEqual([1]);
    expect(out.problems).toEqual([
      { row: 2, column: "value", message: "not a number" },
      { row: 3, column: "birth_date", message: ROW_WITHOUT_DATES },
      { row: 4, column: "value", message: ROW_CENSORED },
    ]);
  });

  it("leaves a report of exact ages and measured values as it is", () => {
    const r = report([row(1), row(2)]);
    expect(ageCurveReport(r)).toBe(r);
  });

  it("names the date columns the mapping lacks", () => {
    const r = report([]);
    expect(missingDateColumns(r)).toEqual([]);
    expect(missingDateColumns({ mapping: { ...r.mapping, birth_date: null, collected_on: null } })).toEqual(["birth_date", "collected_on"]);
  });
});

describe("the LMS fit's pieces", () => {
  it("gives a partition the days whose age in years (days/365.25) lies in [ageMin, ageMax] (issue 11's partition contract)", () => {
    // 0.05 × 365.25 = 18.2625 → day 19 is the first; 17.97 × 365.25 = 6563.5425 → day 6563 the last, so 6564 is excluded.
    expect(lmsPartitionDays({ ageMin: 0.05, ageMax: 17.97 })).toEqual({ ageFromDays: 19, ageToDays: 6564 });
    // An age that is a whole number of days: 1 year = 365.25 days → 366 is the first whole day at or past it.
    expect(lmsPartitionDays({ ageMin: 1, ageMax: 2 })).toEqual({ ageFromDays: 366, ageToDays: 731 });
  });

  it("reads the curves at the table's ages inside the donors' range, with both ends", () => {
    expect(tableAges(0.3, 4.5)).toEqual([0.3, 0.5, 1, 2, 3, 4, 4.5]);
    expect(tableAges(2, 3)).toEqual([2, 3]);
  });

  it("thins evenly, keeping both ends", () => {
    expect(thinIndices(3, 5)).toEqual([0, 1, 2]);
    expect(thinIndices(11, 3)).toEqual([0, 5, 10]);
  });

  it("compares the sexes only with two donors of each", () => {
    expect(compareSexes([0.1, -0.2, 0.3], ["F", "F", "M"])).toBeNull();
    // Harris & Boyd 1990 on the z: equal means and SDs → combine (common practice, no source).
    const z = [-1, 0, 1, -1, 0, 1];
    const out = compareSexes(z, ["F", "F", "F", "M", "M", "M"])!;
    expect(out.harrisBoyd.verdict).toBe("combine");
    expect(out.women).toEqual({ n: 3, meanZ: 0 });
  });

  it("takes sex F, M or null and a whole seed", () => {
    expect(lmsEstimateBody.parse({ method: "lms" })).toEqual({ method: "lms", sex: null, seed: 1 });
    expect(lmsEstimateBody.safeParse({ method: "lms", sex: "X" }).error?.issues[0].message).toBe("sex is F, M or null (both sexes together).");
  });
});
