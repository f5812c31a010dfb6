import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { donorCsv, excludeDirectly, generatedRows, openStudy, sender, signInAll, tableCounts, uploadAndCommit, type Cookies } from "../support/studies";

const { pool } = testDatabase();
afterAll(() => pool.end());

const TABLES = ["studies", "donor_results", "exclusions", "estimates", "interval_versions", "interval_partitions", "signatures", "outbox", "audit_events"];
const counts = () => tableCounts(pool, TABLES);
let cookies: Cookies;
let send: ReturnType<typeof sender>;

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

const CODE = `CMP${Date.now().toString(36).toUpperCase()}`.slice(0, 16);
/** 200 donors, sexes alternating (generatedRows): 100 women, 100 men, values with two decimals. */
const ROWS = generatedRows(200, 41, "R");
const HOSTILE_REASON = "=HYPERLINK(\"http://example.invalid\",\"x\")";
const EXCLUDED = ROWS[0].code;
let studyId: string;
/** Version 1 (one partition, everyone; put in force) and version 2 (by sex; a draft). */
let v1: Doc;
let v2: Doc;
const MISSING = "00000000-0000-4000-8000-000000000000";

async function estimate(body: unknown): Promise<Doc> {
  const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", body);
  expect(res.status).toBe(201);
  return res.json();
}

async function draft(partitions: { estimate: string; method: string }[]): Promise<Doc> {
  const res = await send("POST", "/api/v1/interval-versions", "scientist", { analyte: CODE, study: studyId, partitions });
  expect(res.status).toBe(201);
  return res.json();
}

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  const analyte = await send("POST", "/api/v1/analytes", "scientist", { code: CODE, name: "Comparison analyte", unit: "mmol/L", decimals: 2 });
  expect(analyte.status).toBe(201);
  studyId = await openStudy(send, "Comparison study", "scientist", CODE);
  await uploadAndCommit(cookies, studyId, donorCsv(ROWS));
  await excludeDirectly(pool, { studyId, donorCode: EXCLUDED, reason: HOSTILE_REASON });
  const all = await estimate({ outliers: "none", seed: 2 });
  const women = await estimate({ partition: { sex: "F" }, outliers: "none", seed: 2 });
  const men = await estimate({ partition: { sex: "M" }, outliers: "none", seed: 2 });
  v1 = await draft([{ estimate: all.id, method: "nonparametric" }]);
  v2 = await draft([
    { estimate: women.id, method: "parametric" },
    { estimate: men.id, method: "parametric" },
  ]);
  // Version 1 goes in force through the sign-off routes: submitted by the scientist, signed by the director.
  expect((await send("POST", `/api/v1/interval-versions/${v1.id}/submit`, "scientist")).status).toBe(200);
  const director = demoUser("director");
  const signed = await send("POST", `/api/v1/interval-versions/${v1.id}/sign`, "director", {
    password: director.password,
    email: director.email,
    meaning: "approved_for_clinical_use",
  });
  expect(signed.status, await signed.clone().text()).toBe(200);
  v1 = await signed.json();
});

/** DESIGN.md's flag rule written out: L below the lower limit, H above the upper, N within (inclusive). */
const flag = (v: number, low: number, high: number) => (v < low ? "L" : v > high ? "H" : "N");

describe("GET /api/v1/interval-versions/{id}/comparison", () => {
  it("sets the draft beside the version in force: limits per partition and the donors whose flag would change", async () => {
    const before = await counts();
    const res = await send("GET", `/api/v1/interval-versions/${v2.id}/comparison`, "director");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.inForce.id).toBe(v1.id);
    expect(body.basis).toBe("in_force");
    expect(body.version).toMatchObject({ id: v2.id, number: v2.number, state: "draft" });
    const [women, men] = v2.partitions;
    const [everyone] = v1.partitions;
    // Women and men have no partition of the same scope in version 1: no old limits beside them.
    expect(body.partitions).toEqual([
      { partition: { sex: "F", ageFromDays: null, ageToDays: null, label: "F" }, old: null, new: { low: women.low, high: women.high } },
      { partition: { sex: "M", ageFromDays: null, ageToDays: null, label: "M" }, old: null, new: { low: men.low, high: men.high } },
    ]);
    expect(body.removedPartitions).toEqual([
      { partition: { sex: null, ageFromDays: null, ageToDays: null, label: "All donors" }, old: { low: everyone.low, high: everyone.high } },
    ]);
    // Expected: every donor but the excluded one, flagged by hand under each version's limits.
    const included = ROWS.filter((r) => r.code !== EXCLUDED);
    const changedOf = (sex: "F" | "M", p: Doc) =>
      included.filter((r) => r.sex === sex && flag(Number(r.value), everyone.low, everyone.high) !== flag(Number(r.value), p.low, p.high)).length;
    const changedF = changedOf("F", women);
    const changedM = changedOf("M", men);
    expect(body.donorFlagChanges).toMatchObject({ total: 199, changed: changedF + changedM, notCovered: 0 });
    expect(body.donorFlagChanges.byPartition.map((p: Doc) => [p.partition.label, p.total, p.changed])).toEqual([
      ["F", 99, changedF],
      ["M", 100, changedM],
    ]);
    // The parametric limits differ from the nonparametric ones, so some donor changes flag.
    expect(changedF + changedM).toBeGreaterThan(0);
    expect(await counts()).toEqual(before);
  });

  it("compares a version in force with the one before it, and says when there was none", async () => {
    const res = await send("GET", `/api/v1/interval-versions/${v1.id}/comparison`, "scientist");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.basis).toBe("previous");
    expect(body.inForce).toBeNull();
    expect(body.partitions[0].old).toBeNull();
    expect(body.donorFlagChanges).toMatchObject({ total: 199, changed: 0 });
  });

  it("answers 404 for an unknown version and 422 for an id that is not a UUID", async () => {
    const res = await send("GET", `/api/v1/interval-versions/${MISSING}/comparison`, "director");
    expect(res.status).toBe(404);
    expect((await res.json()).detail).toBe(`There is no interval version with the id ${MISSING}.`);
    expect((await send("GET", "/api/v1/interval-versions/nope/comparison", "director")).status).toBe(422);
  });

  for (const role of ["admin", "clinician", null] as const) {
    it(`refuses ${role ?? "an anonymous caller"} with ${role ? 403 : 401}`, async () => {
      const before = await counts();
      const res = await send("GET", `/api/v1/interval-versions/${v2.id}/comparison`, role);
      expect(res.status).toBe(role ? 403 : 401);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect(await counts()).toEqual(before);
    });
  }
});

async function workbookOf(res: Response): Promise<ExcelJS.Workbook> {
  const workbook = new ExcelJS.Workbook();
  await workbook.xlsx.load(await res.arrayBuffer());
  return workbook;
}

function rowsOf(sheet: ExcelJS.Worksheet): unknown[][] {
  const rows: unknown[][] = [];
  sheet.eachRow({ includeEmpty: false }, (row) => rows.push((row.values as unknown[]).slice(1)));
  return rows;
}

/** Every text cell of the workbook, after checking that no cell is a formula and every text cell is Text ("@"). */
function textsOf(workbook: ExcelJS.Workbook): string[] {
  const texts: string[] = [];
  for (const sheet of workbook.worksheets) {
    sheet.eachRow((row) =>
      row.eachCell((cell) => {
        expect(cell.type, `${sheet.name}!${cell.address}`).not.toBe(ExcelJS.ValueType.Formula);
        expect(cell.formula, `${sheet.name}!${cell.address}`).toBeUndefined();
        if (typeof cell.value === "string") {
          texts.push(cell.value);
          expect(cell.numFmt, `${sheet.name}!${cell.address}`).toBe("@");
        }
      }),
    );
  }
  return texts;
}

describe("GET /api/v1/interval-versions/{id}/dossier", () => {
  it("gives a director the whole dossier, donor rows and exclusions included, no cell a formula, and audits it", async () => {
    const before = await counts();
    const res = await send("GET", `/api/v1/interval-versions/${v1.id}/dossier`, "director");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/vnd.openxmlformats-officedocument.spreadsheetml.sheet");
    expect(res.headers.get("content-disposition")).toMatch(new RegExp(`^attachment; filename="bellwether-dossier-${CODE.toLowerCase()}-v${v1.number}-\\d{4}-\\d{2}-\\d{2}\\.xlsx"$`));
    const workbook = await workbookOf(res);
    expect(workbook.worksheets.map((s) => s.name)).toEqual([
      "Summary", "Signatures", "Partitions", "Methods", "Partition verdicts", "Exclusions", "Donor results", "Audit events",
    ]);
    const texts = textsOf(workbook);
    expect(texts).toContain(HOSTILE_REASON);

    const summary = rowsOf(workbook.getWorksheet("Summary")!);
    const field = (name: string) => summary.find((r) => r[0] === name)?.[1];
    expect(field("Interval version")).toBe(`${CODE} version ${v1.number}`);
    expect(field("State")).toBe("In force");
    expect(field("Study")).toBe("Comparison study");
    expect(field("Donor-level data")).toBe("Included: the Exclusions and Donor results sheets");

    const signatures = rowsOf(workbook.getWorksheet("Signatures")!);
    expect(signatures[1][0]).toBe(demoUser("director").name);
    expect(signatures[1][2]).toBe("Approved for clinical use");
    expect(signatures[1][3]).toBe(v1.signatures[0].contentSha256);
    expect(signatures[1][3]).toMatch(/^[0-9a-f]{64}$/);

    const partitions = rowsOf(workbook.getWorksheet("Partitions")!);
    expect(partitions.slice(1).map((r) => [r[1], r[5], r[8], r[11], r[12]])).toEqual([["All donors", v1.partitions[0].low, v1.partitions[0].high, "nonparametric", 199]]);
    expect(rowsOf(workbook.getWorksheet("Methods")!).slice(1).map((r) => r[0])).toEqual([
      v1.partitions[0].estimateId, v1.partitions[0].estimateId, v1.partitions[0].estimateId,
    ]);
    const exclusions = rowsOf(workbook.getWorksheet("Exclusions")!);
    expect(exclusions.slice(1).map((r) => [r[1], r[7]])).toEqual([[EXCLUDED, HOSTILE_REASON]]);
    expect(rowsOf(workbook.getWorksheet("Donor results")!)).toHaveLength(ROWS.length + 1);
    const audit = rowsOf(workbook.getWorksheet("Audit events")!);
    const actions = audit.slice(1).map((r) => r[2]);
    expect(actions).toEqual(expect.arrayContaining(["study.created", "interval_version.created", "estimate.created"]));

    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    const { rows } = await pool.query("SELECT actor_label, details FROM audit_events WHERE entity_id = $1 AND action = 'interval_version.dossier_exported'", [v1.id]);
    expect(rows.at(-1)).toEqual({ actor_label: demoUser("director").email, details: {
        donorLevel: true,
        donorResults: 200,
        signatures: 1,
        // The audit chain's head the dossier carries (tests/api/audit-chain-head.test.ts checks it against the chain).
        auditChainHead: { position: expect.any(Number), eventId: expect.stringMatching(/^\d+$/), hash: expect.stringMatching(/^[0-9a-f]{64}$/) },
      } });
  });

  it("gives an admin everything but donor-level data: no Exclusions or Donor results sheet, no donor code anywhere", async () => {
    const res = await send("GET", `/api/v1/interval-versions/${v2.id}/dossier`, "admin");
    expect(res.status).toBe(200);
    const workbook = await workbookOf(res);
    expect(workbook.worksheets.map((s) => s.name)).toEqual(["Summary", "Signatures", "Partitions", "Methods", "Partition verdicts", "Audit events"]);
    const texts = textsOf(workbook);
    const codes = new Set(ROWS.map((r) => r.code));
    expect(texts.filter((t) => codes.has(t))).toEqual([]);
    expect(texts).not.toContain(HOSTILE_REASON);
    const summary = rowsOf(workbook.getWorksheet("Summary")!);
    expect(summary.find((r) => r[0] === "Donor-level data")?.[1]).toBe("Left out: the exporting role may not read donor-level data (DESIGN.md, Roles)");
    expect(rowsOf(workbook.getWorksheet("Signatures")!)[1][0]).toBe("No electronic signature on this version.");
    expect(rowsOf(workbook.getWorksheet("Partitions")!).slice(1).map((r) => r[1])).toEqual(["F", "M"]);
  });

  it("gives a scientist the donor rows", async () => {
    const res = await send("GET", `/api/v1/interval-versions/${v2.id}/dossier`, "scientist");
    expect(res.status).toBe(200);
    expect((await workbookOf(res)).getWorksheet("Donor results")).toBeDefined();
  });

  it("answers 404 for an unknown version and changes nothing", async () => {
    const before = await counts();
    const res = await send("GET", `/api/v1/interval-versions/${MISSING}/dossier`, "director");
    expect(res.status).toBe(404);
    expect((await res.json()).detail).toBe(`There is no interval version with the id ${MISSING}.`);
    expect(await counts()).toEqual(before);
  });

  for (const role of ["clinician", null] as (Role | null)[]) {
    it(`refuses ${role ?? "an anonymous caller"} with ${role ? 403 : 401} and changes nothing`, async () => {
      const before = await counts();
      const res = await send("GET", `/api/v1/interval-versions/${v1.id}/dossier`, role);
      expect(res.status).toBe(role ? 403 : 401);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect(await counts()).toEqual(before);
    });
  }
});
