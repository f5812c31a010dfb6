import { readFileSync } from "node:fs";
import path from "node:path";
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import {
  cleanRoutineResults,
  excludeFlagged,
  excludeSettings,
  inPartition,
  onePerPatient,
  restrictToPeriod,
  type RoutineResult,
} from "@/lib/indirect/cleaning";

// A hand-made file of 16 routine results (7 patients); every count below was worked out by hand
// from the file, row by row (rows numbered from 1 under the header).
const FILE = path.resolve(__dirname, "../fixtures/indirect-cleaning.csv");

function load(): (RoutineResult & { row: number })[] {
  const parsed = Papa.parse<Record<string, string>>(readFileSync(FILE, "utf8"), { header: true, skipEmptyLines: true });
  return parsed.data.map((r, i) => ({
    row: i + 1,
    patient: r.patient,
    sex: r.sex as "F" | "M",
    ageYears: Number(r.age_years),
    collectedAt: r.collected_at,
    value: r.value.startsWith("<") ? { value: Number(r.value.slice(1)), side: "below" as const } : Number(r.value),
    setting: r.setting === "" ? null : r.setting,
    flags: r.flags === "" ? [] : r.flags.split(";"),
  }));
}

const rows = load();
const rowsOf = (xs: { row: number }[]) => xs.map((r) => r.row);

describe("indirect data cleaning, step by step", () => {
  it("restricts to a stable period, dates inclusive", () => {
    // Row 1 (2024-12-30) and row 13 (2025-07-01T00:01) lie outside; row 12 (2025-06-30T23:59) is in.
    expect(rowsOf(restrictToPeriod(rows, { from: "2025-01-01", to: "2025-06-30" }))).toEqual([2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 14, 15, 16]);
  });

  it("excludes settings without regard to case and keeps results without a setting", () => {
    // Inpatient rows 3 and 15, emergency row 8; row 12 "Outpatient" stays, rows 10–11 (no setting) stay.
    expect(rowsOf(excludeSettings(rows, ["inpatient", "EMERGENCY"]))).toEqual([1, 2, 4, 5, 6, 7, 9, 10, 11, 12, 13, 14, 16]);
  });

  it("excludes chosen flags, or every flagged result", () => {
    // haemolysed: row 5 and row 14 (icteric;haemolysed); any flag also takes the lipaemic row 10.
    expect(rowsOf(excludeFlagged(rows, ["haemolysed"]))).not.toContain(5);
    expect(rows.length - excludeFlagged(rows, ["haemolysed"]).length).toBe(2);
    expect(rows.length - excludeFlagged(rows, "any").length).toBe(3);
  });

  it("keeps each patient's first or last result by collection time", () => {
    // 7 patients; P01 rows 1–3, P02 rows 4–6, P04 rows 8–9, P05 rows 10–11, P06 rows 12–13, P08 rows 15–16.
    expect(rowsOf(onePerPatient(rows, "first"))).toEqual([1, 4, 7, 8, 10, 12, 14, 15]);
    expect(rowsOf(onePerPatient(rows, "last"))).toEqual([3, 6, 7, 9, 11, 13, 14, 16]);
  });

  it("keeps one partition: sex and the half-open age range", () => {
    // Females aged 18 to under 65: P01 (34), P06 (45), P07 (40); P03 is 17 and P04 is 66.
    expect(rowsOf(inPartition(rows, { sex: "F", ageFrom: 18, ageTo: 65 }))).toEqual([1, 2, 3, 12, 13, 14]);
    expect(inPartition(rows, {}).length).toBe(16);
  });
});

describe("cleanRoutineResults records the counts each step removes", () => {
  it("applies period, settings, flags, first result and partition in that order", () => {
    const { rows: kept, steps } = cleanRoutineResults(rows, {
      period: { from: "2025-01-01", to: "2025-06-30" },
      excludeSettings: ["inpatient", "emergency"],
      excludeFlags: ["haemolysed"],
      onePerPatient: "first",
      partition: { sex: "F", ageFrom: 18, ageTo: 65 },
    });
    // By hand: period −2 (rows 1, 13) → 14; settings −3 (rows 3, 8, 15) → 11; flags −2 (rows 5,
    // 14) → 9; first per patient −2 (P02's row 6, P05's row 11) → 7; females 18–<65 −5 → 2.
    expect(steps.map((s) => [s.step, s.before, s.removed, s.remaining])).toEqual([
      ["period", 16, 2, 14],
      ["settings", 14, 3, 11],
      ["flags", 11, 2, 9],
      ["one-per-patient", 9, 2, 7],
      ["partition", 7, 5, 2],
    ]);
    expect(rowsOf(kept)).toEqual([2, 12]);
    expect(kept.map((r) => r.value)).toEqual([4.3, 4.0]);
    expect(steps[4].description).toBe("kept the partition females, aged 18 to under 65");
  });

  it("keeps the last result among the eligible ones, and the censored value of a kept row", () => {
    const { rows: kept, steps } = cleanRoutineResults(rows, {
      excludeFlags: "any",
      onePerPatient: "last",
      partition: { sex: "M", ageFrom: 18, ageTo: 65 },
    });
    // Flags (any) −3 (rows 5, 10, 14) → 13; last per patient: P01 row 3, P02 row 6, P03 row 7, P04
    // row 9, P05 row 11, P06 row 13, P08 row 16 → 7 (−6); males 18–<65: P02, P05 → 2 (−5).
    expect(steps.map((s) => [s.step, s.removed, s.remaining])).toEqual([
      ["flags", 3, 13],
      ["one-per-patient", 6, 7],
      ["partition", 5, 2],
    ]);
    expect(rowsOf(kept)).toEqual([6, 11]);
    const censored = cleanRoutineResults(rows, { onePerPatient: "all", partition: { sex: "F", ageFrom: 65 } });
    // P04 (66) has the only censored result, "<0.5", kept as such.
    expect(censored.rows.map((r) => r.value)).toEqual([{ value: 0.5, side: "below" }, 4.8]);
    expect(censored.steps).toEqual([
      { step: "partition", description: "kept the partition females, aged 65 to under any age", before: 16, removed: 14, remaining: 2 },
    ]);
  });

  it("records nothing for a plan that keeps every result", () => {
    expect(cleanRoutineResults(rows, { onePerPatient: "all" })).toEqual({ rows, steps: [] });
  });
});
