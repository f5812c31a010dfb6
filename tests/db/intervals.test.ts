import type { Pool } from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Database } from "@/db/client";
import { listAnalyteVersionStates } from "@/db/queries/intervals";
import { testDatabase } from "../support/database";

let database: Database;
let pool: Pool;
beforeAll(() => {
  ({ database, pool } = testDatabase());
});
afterAll(async () => {
  await pool?.end();
});

// The demo seed (db/demo-studies.ts): sodium in force with a draft version 2 from the electrode
// change; alkaline phosphatase only awaiting sign-off; the catalogue's analytes from db/seed.ts.
describe("every analyte's version states (what the score page says of an analyte with nothing in force)", () => {
  it("lists each analyte of the catalogue once, with its versions' states newest first", async () => {
    const rows = await listAnalyteVersionStates(database);
    const codes = rows.map((r) => r.code);
    expect(new Set(codes).size).toBe(codes.length);
    expect(codes).toEqual(expect.arrayContaining(["ALP", "ALT", "CA", "CREA", "GLU", "HGB", "K", "NA", "TSH", "UREA"]));
    const of = (code: string) => rows.find((r) => r.code === code)!;
    expect(of("ALP").states).toContain("awaiting_signoff");
    expect(of("ALP").states).not.toContain("in_force");
    expect(of("NA").states.slice(-2)).toEqual(["draft", "in_force"]);
    expect(of("NA").withdrawnAt).toBeNull();
  });
});
