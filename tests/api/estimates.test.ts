import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import {
  donorCsv,
  excludeDirectly,
  generatedRows,
  openStudy,
  sender,
  sha256,
  signInAll,
  tableCounts,
  uploadAndCommit,
  type Cookies,
  type DonorRow,
} from "../support/studies";

const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const { pool } = testDatabase();
const scratch = mkdtempSync(path.join(os.tmpdir(), "bellwether-estimates-"));
afterAll(async () => {
  rmSync(scratch, { recursive: true, force: true });
  await pool.end();
});

const TABLES = ["studies", "uploads", "donor_results", "exclusions", "estimates", "audit_events"];
let cookies: Cookies;
let send: ReturnType<typeof sender>;
const counts = () => tableCounts(pool, TABLES);

/** 150 donors and one gross outlier (40.00 among values near 5), so that a screen has something to propose. */
const ROWS: DonorRow[] = [...generatedRows(150, 11), { code: "GROSS", sex: "M", age: 44, value: "40.00" }];
const CSV = donorCsv(ROWS);
let studyId: string;

/** The command line exactly as package.json's "bellwether" script runs it (scripts/cli/launch.cjs). */
async function cli(args: string[]): Promise<unknown> {
  const { stdout } = await exec(process.execPath, ["scripts/cli/launch.cjs", "estimate", ...args], { cwd: ROOT, maxBuffer: 64 << 20 });
  return JSON.parse(stdout);
}

function withoutIdentity(doc: Record<string, unknown>): Record<string, unknown> {
  const { id, studyId: s, partition, createdAt, ...rest } = doc;
  expect([typeof id, typeof s, typeof partition, typeof createdAt]).toEqual(["string", "string", "object", "string"]);
  return rest;
}

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  studyId = await openStudy(send, "Glucose estimates");
  await uploadAndCommit(cookies, studyId, CSV);
});

describe("POST /api/v1/studies/{id}/estimates", () => {
  it("with outliers none and no exclusions equals the command line's document on the same values, field for field", async () => {
    const file = path.join(scratch, "values.csv");
    // The same rows in the same order (donor_results.id follows the file's rows).
    writeFileSync(file, `value\n${ROWS.map((r) => r.value).join("\n")}\n`);
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { outliers: "none", transform: "box-cox", seed: 7 });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(res.headers.get("location")).toBe(`/api/v1/studies/${studyId}/estimates/${body.id}`);
    expect(body).toMatchObject({ studyId, partition: { sex: null, ageFrom: null, ageTo: null }, n: 151 });

    // The brief's own command, with the command line's defaults otherwise. With no screen there
    // is nothing to propose or apply, so the app records the command line's default mode.
    const expected = await cli([file, "--outliers", "none", "--transform", "box-cox", "--seed", "7"]);
    expect(withoutIdentity(body)).toEqual(expected);
    // The engine identity is the command line's own stamp: package name and version from package.json.
    expect(body.provenance.engine).toMatchObject({ name: "bellwether", version: "0.1.0" });
  }, 120_000);

  it("with a screen named lists its proposals under proposed and excludes nothing", async () => {
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "director", { outliers: "dixon", transform: "auto", seed: 3 });
    expect(res.status).toBe(201);
    const doc = await res.json();
    expect(doc.n).toBe(ROWS.length);
    expect(doc.excluded).toEqual([]);
    expect(doc.screening).toEqual({ outliers: "dixon", rule: "dixon", mode: "propose", applied: false, valuesGiven: ROWS.length });
    // The gross value is the last row, index 150 in the values given (Dixon/Reed: its gap to
    // the next value is far above a third of the range).
    expect(doc.proposed).toEqual([expect.objectContaining({ value: 40, reason: "dixon", index: 150 })]);
    expect(doc.warnings).toContain(
      "The Dixon/Reed screen proposes 1 value for exclusion; they are included in these limits until an exclusion is confirmed.",
    );
  });

  it("gives the same numbers when estimating twice with the same data, options and seed", async () => {
    const options = { outliers: "horn", transform: "auto", seed: 42 };
    const a = await (await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", options)).json();
    const b = await (await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", options)).json();
    expect(a.id).not.toBe(b.id);
    expect(withoutIdentity(b)).toEqual(withoutIdentity(a));
    expect(a.provenance.options).toEqual({ outliers: "horn", screening: "propose", transform: "auto", seed: 42 });
  });

  it("estimates a partition: sex matches and ageFrom <= age < ageTo", async () => {
    const partition = { sex: "F", ageFrom: 30, ageTo: 50 };
    const expected = ROWS.filter((r) => r.sex === "F" && r.age >= 30 && r.age < 50);
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { partition, outliers: "none" });
    expect(res.status).toBe(201);
    const doc = await res.json();
    expect(doc.partition).toEqual(partition);
    expect(doc.n).toBe(expected.length);
    const [row] = (await pool.query("SELECT sex, age_from, age_to, options, seed, n FROM estimates WHERE id = $1", [doc.id])).rows;
    expect(row).toEqual({ sex: "F", age_from: 30, age_to: 50, options: { outliers: "none", transform: "auto", seed: 1 }, seed: 1, n: expected.length });
  });

  it("leaves out donor results with an exclusion in effect and stores the exclusions and upload hashes", async () => {
    const { exclusionId } = await excludeDirectly(pool, { studyId, donorCode: "GROSS", reason: "Haemolysed sample" });
    const { rows: undone } = await pool.query(
      `INSERT INTO exclusions (study_id, donor_result_id, source, reason, undone_at, undone_by)
       SELECT $1, id, 'manual', 'Entered in error', now(), (SELECT id FROM users WHERE email = $2)
       FROM donor_results WHERE study_id = $1 AND donor_code = 'D1' RETURNING id`,
      [studyId, demoUser("scientist").email],
    );
    expect(undone).toHaveLength(1);
    try {
      const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { outliers: "none" });
      expect(res.status).toBe(201);
      const doc = await res.json();
      expect(doc.n).toBe(ROWS.length - 1);
      expect(doc.nonparametric.upper).toBeLessThan(40);
      const [row] = (await pool.query("SELECT exclusion_ids, upload_hashes FROM estimates WHERE id = $1", [doc.id])).rows;
      expect(row).toEqual({ exclusion_ids: [exclusionId], upload_hashes: [sha256(CSV)] });
    } finally {
      await pool.query("UPDATE exclusions SET undone_at = now(), undone_by = (SELECT id FROM users WHERE email = $2) WHERE id = $1", [
        exclusionId,
        demoUser("scientist").email,
      ]);
    }
  });

  it("passes censored donor results to the engine as censored values", async () => {
    const id = await openStudy(send, "Glucose with censored values");
    const rows = generatedRows(60, 5, "C");
    rows[3] = { ...rows[3], value: "<3.00" };
    rows[8] = { ...rows[8], value: "<3.00" };
    await uploadAndCommit(cookies, id, donorCsv(rows));
    const res = await send("POST", `/api/v1/studies/${id}/estimates`, "scientist", { outliers: "none" });
    expect(res.status).toBe(201);
    const doc = await res.json();
    expect(doc.n).toBe(60);
    expect(doc.censored).toEqual({ below: 2, above: 0, fraction: 2 / 60 });
  });

  it("records an audit event in the same transaction", async () => {
    const before = await counts();
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "director", { outliers: "tukey", seed: 9 });
    expect(res.status).toBe(201);
    const { id } = await res.json();
    expect(await counts()).toEqual({ ...before, estimates: before.estimates + 1, audit_events: before.audit_events + 1 });
    const [event] = (await pool.query("SELECT actor_label, action, entity_type, details FROM audit_events WHERE entity_id = $1", [id])).rows;
    expect(event).toMatchObject({
      actor_label: demoUser("director").email,
      action: "estimate.created",
      entity_type: "estimate",
      details: { studyId, n: ROWS.length, options: { outliers: "tukey", transform: "auto", seed: 9 }, uploadHashes: [sha256(CSV)] },
    });
  });

  const refusals: [string, () => string, unknown, number, string][] = [
    ["a partition that holds no values", () => studyId, { partition: { ageFrom: 100, ageTo: 110 } }, 422,
      "The partition (age 100 to under 110) holds no donor results without an exclusion in effect: there is nothing to estimate."],
    ["an unknown outlier screen", () => studyId, { outliers: "grubbs" }, 422, "outliers: outliers is one of none, dixon, tukey, horn."],
    ["a seed that is not whole", () => studyId, { seed: 1.5 }, 422, "seed: seed is a whole number."],
    ["an age band the wrong way round", () => studyId, { partition: { ageFrom: 50, ageTo: 20 } }, 422,
      "partition.ageTo: ageFrom must be below ageTo (the range is [ageFrom, ageTo))."],
    ["a sex other than F or M", () => studyId, { partition: { sex: "X" } }, 422, "partition.sex: sex is F or M."],
    ["an unknown study", () => "00000000-0000-4000-8000-000000000000", {}, 404, "There is no study with the id 00000000-0000-4000-8000-000000000000."],
  ];
  for (const [what, study, body, status, detail] of refusals) {
    it(`answers ${status} for ${what}, saying so, and changes nothing`, async () => {
      const before = await counts();
      const res = await send("POST", `/api/v1/studies/${study()}/estimates`, "scientist", body);
      expect(res.status).toBe(status);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect((await res.json()).detail).toBe(detail);
      expect(await counts()).toEqual(before);
    });
  }

  it("answers 409 on a closed study and changes nothing", async () => {
    const id = await openStudy(send, "Closed glucose study");
    await uploadAndCommit(cookies, id, donorCsv(generatedRows(30, 2, "Z")));
    await pool.query("UPDATE studies SET status = 'closed', closed_at = now() WHERE id = $1", [id]);
    const before = await counts();
    const res = await send("POST", `/api/v1/studies/${id}/estimates`, "scientist", {});
    expect(res.status).toBe(409);
    expect((await res.json()).detail).toBe("The study is closed: it takes no more estimates.");
    expect(await counts()).toEqual(before);
  });

  for (const role of ["admin", "clinician"] as const) {
    it(`refuses the ${role} with 403 and changes nothing`, async () => {
      const before = await counts();
      const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, role, {});
      expect(res.status).toBe(403);
      expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      expect((await send("GET", `/api/v1/studies/${studyId}/estimates`, role)).status).toBe(403);
      expect(await counts()).toEqual(before);
    });
  }

  it("answers an anonymous caller 401 and changes nothing", async () => {
    const before = await counts();
    expect((await send("POST", `/api/v1/studies/${studyId}/estimates`, null, {})).status).toBe(401);
    expect((await send("GET", `/api/v1/studies/${studyId}/estimates`, null)).status).toBe(401);
    expect(await counts()).toEqual(before);
  });
});

describe("GET /api/v1/studies/{id}/estimates and /estimates/{estimateId}", () => {
  let first: Record<string, unknown>;
  let second: Record<string, unknown>;
  beforeAll(async () => {
    first = await (await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { partition: { sex: "M" }, seed: 2 })).json();
    second = await (await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { outliers: "none", transform: "ln" })).json();
  });

  it("lists the study's estimates newest first, in brief", async () => {
    const res = await send("GET", `/api/v1/studies/${studyId}/estimates`, "director");
    expect(res.status).toBe(200);
    const { items } = await res.json();
    expect(items[0]).toEqual({
      id: second.id,
      partition: { sex: null, ageFrom: null, ageTo: null },
      options: { outliers: "none", transform: "ln", seed: 1 },
      n: second.n,
      createdAt: second.createdAt,
      recommended: second.recommended,
      nonparametric: second.nonparametric,
      parametric: second.parametric,
      robust: second.robust,
      warnings: second.warnings,
    });
    expect(items[1]).toMatchObject({ id: first.id, partition: { sex: "M", ageFrom: null, ageTo: null } });
  });

  it("answers one estimate as stored, the same document the POST answered", async () => {
    const res = await send("GET", `/api/v1/studies/${studyId}/estimates/${first.id}`, "scientist");
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual(first);
  });

  it("answers 404 for an unknown estimate and for an estimate of another study", async () => {
    const missing = "00000000-0000-4000-8000-000000000000";
    const unknown = await send("GET", `/api/v1/studies/${studyId}/estimates/${missing}`, "scientist");
    expect(unknown.status).toBe(404);
    expect((await unknown.json()).detail).toBe(`There is no estimate with the id ${missing} in this study.`);
    const other = await openStudy(send, "Another glucose study");
    const elsewhere = await send("GET", `/api/v1/studies/${other}/estimates/${first.id}`, "scientist");
    expect(elsewhere.status).toBe(404);
    expect((await elsewhere.json()).detail).toBe(`There is no estimate with the id ${first.id} in this study.`);
    const bad = await send("GET", `/api/v1/studies/${studyId}/estimates/nope`, "scientist");
    expect(bad.status).toBe(422);
    expect((await bad.json()).detail).toBe("estimateId: The estimate id must be a UUID.");
  });

  for (const role of ["admin", "clinician"] as const) {
    it(`refuses the ${role} an estimate with 403`, async () => {
      const res = await send("GET", `/api/v1/studies/${studyId}/estimates/${first.id}`, role);
      expect(res.status).toBe(403);
    });
  }
});
