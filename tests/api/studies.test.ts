import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";

const { pool } = testDatabase();
afterAll(() => pool.end());

/** DESIGN.md's roles table written out: studies and donor-level data are for directors and scientists only. */
const MAY_WORK: Record<Role, boolean> = { admin: false, director: true, scientist: true, clinician: false };
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];

const cookies = {} as Record<Role, string>;
beforeAll(async () => {
  for (const role of ROLES) cookies[role] = await signInOverHttp(demoUser(role).email, demoUser(role).password);
});

function send(method: string, path: string, role: Role | null, body?: unknown): Promise<Response> {
  const headers: Record<string, string> = {};
  if (role) headers.cookie = cookies[role];
  if (body !== undefined) headers["content-type"] = "application/json";
  return fetch(`${BASE_URL}${path}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
}

/** Row counts of every domain table (and the audit trail), to show what a request changed. */
async function counts(): Promise<Record<string, number>> {
  const tables = ["users", "analytes", "studies", "uploads", "donor_results", "audit_events"];
  const out: Record<string, number> = {};
  for (const t of tables) out[t] = (await pool.query(`SELECT count(*)::int AS n FROM ${t}`)).rows[0].n;
  return out;
}

const newStudy = (title: string) => ({
  analyte: "GLU",
  title,
  method: "Hexokinase, Cobas c 503",
  specimen: "plasma",
  criteria: "Fasting adults 18-65 without diabetes, pregnancy or acute illness.",
});

describe("POST /api/v1/studies", () => {
  for (const role of ROLES) {
    it(`${MAY_WORK[role] ? "lets" : "refuses"} the ${role} ${MAY_WORK[role] ? "open" : "opening"} a study`, async () => {
      const before = await counts();
      const res = await send("POST", "/api/v1/studies", role, newStudy(`Glucose ${role}`));
      if (MAY_WORK[role]) {
        expect(res.status).toBe(201);
        const body = await res.json();
        const { title, method, specimen, criteria } = newStudy(`Glucose ${role}`);
        expect(body).toMatchObject({ title, method, specimen, criteria, analyteCode: "GLU", status: "open", createdBy: expect.any(String) });
        expect(res.headers.get("location")).toBe(`/api/v1/studies/${body.id}`);
        expect(await counts()).toEqual({ ...before, studies: before.studies + 1, audit_events: before.audit_events + 1 });
        const [event] = (await pool.query("SELECT actor_label, action FROM audit_events WHERE entity_id = $1", [body.id])).rows;
        expect(event).toEqual({ actor_label: demoUser(role).email, action: "study.created" });
      } else {
        expect(res.status).toBe(403);
        expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
        expect(await counts()).toEqual(before);
      }
    });
  }

  it("answers an anonymous caller 401", async () => {
    const res = await send("POST", "/api/v1/studies", null, newStudy("anonymous"));
    expect(res.status).toBe(401);
  });

  const invalid: [string, Record<string, unknown>, string][] = [
    ["an unknown analyte code", { analyte: "NOPE" }, "There is no analyte with the code NOPE."],
    ["an empty title", { title: " " }, "title: Give the study a title."],
    ["a field the API does not know", { titel: "x" }, 'Unrecognized key: "titel"'],
  ];
  for (const [what, change, message] of invalid) {
    it(`answers 422 for ${what}, saying so, and changes nothing`, async () => {
      const before = await counts();
      const res = await send("POST", "/api/v1/studies", "scientist", { ...newStudy("bad"), ...change });
      expect(res.status).toBe(422);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect((await res.json()).detail).toContain(message);
      expect(await counts()).toEqual(before);
    });
  }
});

describe("GET /api/v1/studies and /api/v1/studies/{id}", () => {
  let id: string;
  beforeAll(async () => {
    const res = await send("POST", "/api/v1/studies", "director", newStudy("Newest glucose study"));
    id = (await res.json()).id;
  });

  for (const role of ROLES) {
    it(`${MAY_WORK[role] ? "lists" : "refuses to list"} studies for the ${role}`, async () => {
      const list = await send("GET", "/api/v1/studies", role);
      const one = await send("GET", `/api/v1/studies/${id}`, role);
      if (MAY_WORK[role]) {
        expect(list.status).toBe(200);
        const { studies } = await list.json();
        expect(studies[0]).toMatchObject({ id, title: "Newest glucose study", analyteCode: "GLU", uploadCount: 0, donorResultCount: 0 });
        expect(one.status).toBe(200);
        expect(await one.json()).toMatchObject({ id, analyteCode: "GLU", analyte: { code: "GLU", unit: "mmol/L" }, uploads: [], donorResultCount: 0 });
      } else {
        expect(list.status).toBe(403);
        expect(one.status).toBe(403);
      }
    });
  }

  it("answers 404 for a study that does not exist and 422 for an id that is no UUID", async () => {
    const missing = "00000000-0000-4000-8000-000000000000";
    const res = await send("GET", `/api/v1/studies/${missing}`, "scientist");
    expect(res.status).toBe(404);
    expect((await res.json()).detail).toBe(`There is no study with the id ${missing}.`);
    const bad = await send("GET", "/api/v1/studies/nope", "scientist");
    expect(bad.status).toBe(422);
    expect((await bad.json()).detail).toBe("id: The study id must be a UUID.");
  });
});

function upload(studyId: string, role: Role, file: string | Uint8Array<ArrayBuffer>, fields: Record<string, string> = {}, name = "donors.csv") {
  const form = new FormData();
  form.set("file", new Blob([file]), name);
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  return fetch(`${BASE_URL}/api/v1/studies/${studyId}/uploads`, { method: "POST", headers: { cookie: cookies[role] }, body: form });
}

async function openStudy(title: string): Promise<string> {
  const res = await send("POST", "/api/v1/studies", "scientist", newStudy(title));
  expect(res.status).toBe(201);
  return (await res.json()).id;
}

const HEADER = "donor_code,sex,age_years,birth_date,collected_on,value,unit";
/** Four rows: two valid in the analyte's unit, one in mg/dL (converted with glucose's molar mass), one bad value. */
const GOOD_AND_BAD = [HEADER, "D1,F,34,,2026-01-05,5.1,", "D2,M,51,,2026-01-06,<2.0,mmol/L", "D3,F,29,,2026-01-07,90,mg/dL", "D4,M,40,,2026-01-08,abc,"].join("\n");

describe("uploads: check, then commit or cancel", () => {
  let studyId: string;
  beforeAll(async () => {
    studyId = await openStudy("Uploads");
  });

  for (const role of ["admin", "clinician"] as const) {
    it(`refuses the ${role} an upload, a commit and a cancel with 403, changing nothing`, async () => {
      const before = await counts();
      const res = await upload(studyId, role, GOOD_AND_BAD);
      expect(res.status).toBe(403);
      expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      const someId = "00000000-0000-4000-8000-000000000000";
      for (const action of ["commit", "cancel"]) {
        const r = await send("POST", `/api/v1/studies/${studyId}/uploads/${someId}/${action}`, role);
        expect(r.status).toBe(403);
      }
      expect(await counts()).toEqual(before);
    });
  }

  it("checks a file and keeps it pending, storing no donor result; commit stores the valid rows once", async () => {
    const before = await counts();
    const res = await upload(studyId, "scientist", GOOD_AND_BAD);
    expect(res.status).toBe(201);
    const report = await res.json();
    expect(report).toMatchObject({
      status: "pending",
      rows: { total: 4, valid: 3, invalid: 1 },
      problems: [{ row: 4, column: "value", message: 'value "abc" is not a number' }],
      fileName: "donors.csv",
      sizeBytes: Buffer.byteLength(GOOD_AND_BAD),
    });
    expect(report.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(await counts()).toEqual({ ...before, uploads: before.uploads + 1, audit_events: before.audit_events + 1 });

    const committed = await send("POST", `/api/v1/studies/${studyId}/uploads/${report.id}/commit`, "director");
    expect(committed.status).toBe(200);
    expect(await committed.json()).toEqual({ status: "committed", stored: 3 });
    expect(await counts()).toEqual({
      ...before,
      uploads: before.uploads + 1,
      donor_results: before.donor_results + 3,
      audit_events: before.audit_events + 2,
    });
    const rows = (
      await pool.query(
        "SELECT row_number, donor_code, sex, age_years, age_days, collected_on, value, censoring_side, censoring_inclusive, original_value, original_unit FROM donor_results WHERE upload_id = $1 ORDER BY row_number",
        [report.id],
      )
    ).rows;
    expect(rows.map((r) => [r.row_number, r.donor_code, r.sex, r.censoring_side, r.censoring_inclusive, r.original_unit])).toEqual([
      [1, "D1", "F", null, null, null],
      [2, "D2", "M", "below", false, null],
      [3, "D3", "F", null, null, "mg/dL"],
    ]);
    expect(rows[2].value).toBeCloseTo(90 / 18.0156, 6);
    expect(rows[2].original_value).toBe(90);

    const again = await send("POST", `/api/v1/studies/${studyId}/uploads/${report.id}/commit`, "scientist");
    expect(again.status).toBe(409);
    expect((await again.json()).detail).toBe("The upload is committed, not pending.");
    const cancelLate = await send("POST", `/api/v1/studies/${studyId}/uploads/${report.id}/cancel`, "scientist");
    expect(cancelLate.status).toBe(409);

    const beforeDuplicate = await counts();
    const duplicate = await upload(studyId, "director", GOOD_AND_BAD, {}, "renamed.csv");
    expect(duplicate.status).toBe(409);
    expect((await duplicate.json()).detail).toBe(
      "The same file (renamed.csv, by its SHA-256) is already committed in this study; it was not stored again.",
    );
    expect(await counts()).toEqual(beforeDuplicate);

    const detail = await (await send("GET", `/api/v1/studies/${studyId}`, "scientist")).json();
    expect(detail.donorResultCount).toBe(3);
    expect(detail.uploads).toMatchObject([{ id: report.id, status: "committed", rows: { total: 4, valid: 3, invalid: 1 }, storedRows: 3 }]);
  });

  it("cancels a pending upload: its rows are discarded, the upload stays on record", async () => {
    const res = await upload(studyId, "director", [HEADER, "C1,F,30,,,4.4,"].join("\n"));
    expect(res.status).toBe(201);
    const { id } = await res.json();
    const before = await counts();
    const cancelled = await send("POST", `/api/v1/studies/${studyId}/uploads/${id}/cancel`, "scientist");
    expect(cancelled.status).toBe(200);
    expect(await cancelled.json()).toEqual({ status: "cancelled" });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    const [row] = (await pool.query("SELECT status, pending_rows FROM uploads WHERE id = $1", [id])).rows;
    expect(row).toEqual({ status: "cancelled", pending_rows: null });
    const commit = await send("POST", `/api/v1/studies/${studyId}/uploads/${id}/commit`, "scientist");
    expect(commit.status).toBe(409);
    expect((await commit.json()).detail).toBe("The upload is cancelled, not pending.");
  });

  it("reads a mapping and decimal commas", async () => {
    const csv = ["Code;Gender;Age;Result", "M1;F;33;5,2"].join("\n");
    const res = await upload(studyId, "scientist", csv, {
      mapping: JSON.stringify({ donor_code: "Code", sex: "Gender", age_years: "Age", value: "Result" }),
      decimalComma: "true",
    });
    expect(res.status).toBe(201);
    expect(await res.json()).toMatchObject({ status: "pending", rows: { total: 1, valid: 1, invalid: 0 }, problems: [] });
  });

  const refused: [string, () => Promise<Response>, number, string][] = [
    ["an empty file", () => upload(studyId, "scientist", ""), 422, "the file is empty"],
    ["a binary file", () => upload(studyId, "scientist", new Uint8Array([0, 1, 2, 3, 4])), 415, "the file is neither CSV text nor an Excel workbook (.xlsx)"],
    ["a header without rows", () => upload(studyId, "scientist", HEADER), 422, "the file has a header row but no data rows"],
    ["a mapping that is not JSON", () => upload(studyId, "scientist", GOOD_AND_BAD, { mapping: "{" }), 422, "mapping: The mapping is not valid JSON."],
    ["a decimalComma that is not true or false", () => upload(studyId, "scientist", GOOD_AND_BAD, { decimalComma: "yes" }), 422, 'decimalComma: decimalComma is "true" or "false".'],
    ["a JSON body", () => send("POST", `/api/v1/studies/${studyId}/uploads`, "scientist", {}), 415, "Send the request body as multipart/form-data."],
    [
      "a form without a file",
      () => {
        const form = new FormData();
        form.set("decimalComma", "false");
        return fetch(`${BASE_URL}/api/v1/studies/${studyId}/uploads`, { method: "POST", headers: { cookie: cookies.scientist }, body: form });
      },
      422,
      "file: Attach the file (CSV or XLSX) in the field named file.",
    ],
    ["a file over 20 MB", () => upload(studyId, "scientist", new Uint8Array(21 * 1024 * 1024).fill(65)), 413, "the file is larger than 20 MB; split it into several uploads"],
  ];
  for (const [what, request, status, message] of refused) {
    it(`refuses ${what} with ${status}, storing no donor result and no upload`, async () => {
      const before = await counts();
      const res = await request();
      expect(res.status).toBe(status);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      const detail = (await res.json()).detail;
      expect(detail).toBe(message);
      const after = await counts();
      // Only the audit trail may grow (a refusal of a file is recorded there).
      expect({ ...after, audit_events: 0 }).toEqual({ ...before, audit_events: 0 });
      expect(after.audit_events).toBeGreaterThanOrEqual(before.audit_events);
    });
  }

  it("refuses uploads to a closed study with 409", async () => {
    const closedId = await openStudy("Closed");
    await pool.query("UPDATE studies SET status = 'closed' WHERE id = $1", [closedId]);
    const before = await counts();
    const res = await upload(closedId, "scientist", GOOD_AND_BAD);
    expect(res.status).toBe(409);
    expect((await res.json()).detail).toBe("The study is closed: it takes no more uploads.");
    expect(await counts()).toEqual(before);
  });
});

describe("GET /api/v1/studies/{id}/donor-results", () => {
  let studyId: string;
  beforeAll(async () => {
    studyId = await openStudy("Listing");
    const rows = [HEADER, "A,F,20,,,5.0,", "B,M,30,,,4.0,", "C,F,40,,,6.0,", "D,M,50,,,5.5,"].join("\n");
    const { id } = await (await upload(studyId, "scientist", rows)).json();
    expect((await send("POST", `/api/v1/studies/${studyId}/uploads/${id}/commit`, "scientist")).status).toBe(200);
  });

  for (const role of ROLES) {
    it(`${MAY_WORK[role] ? "lists" : "refuses"} donor results for the ${role}`, async () => {
      const res = await send("GET", `/api/v1/studies/${studyId}/donor-results`, role);
      if (MAY_WORK[role]) {
        expect(res.status).toBe(200);
        const body = await res.json();
        expect(body).toMatchObject({ total: 4, page: 1, pageSize: 100 });
        expect(body.items.map((i: { donorCode: string }) => i.donorCode)).toEqual(["A", "B", "C", "D"]);
        expect(body.items[0]).toMatchObject({ donorCode: "A", sex: "F", ageYears: 20, value: 5, excluded: false, rowNumber: 1 });
      } else {
        expect(res.status).toBe(403);
        expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      }
    });
  }

  it("sorts, filters and pages", async () => {
    const get = async (q: string) => (await send("GET", `/api/v1/studies/${studyId}/donor-results?${q}`, "director")).json();
    expect((await get("sort=-value")).items.map((i: { donorCode: string }) => i.donorCode)).toEqual(["C", "D", "A", "B"]);
    expect(await get("sex=M&pageSize=1&page=2&sort=ageYears")).toMatchObject({ total: 2, page: 2, pageSize: 1, items: [{ donorCode: "D" }] });
    expect((await get("ageFrom=25&ageTo=45")).items.map((i: { donorCode: string }) => i.donorCode)).toEqual(["B", "C"]);
    expect(await get("excluded=true")).toMatchObject({ total: 0, items: [] });
    expect((await get("excluded=false")).total).toBe(4);
  });

  const bad: [string, string][] = [
    ["pageSize=501", "pageSize: pageSize is a whole number from 1 to 500."],
    ["sort=birthDate; DROP", "sort: sort is one of rowNumber, donorCode, sex, ageYears, ageDays, collectedOn, value, id, with - in front for descending."],
    ["sex=X", "sex: sex is F or M."],
    ["excluded=maybe", 'excluded: Use "true" or "false".'],
  ];
  for (const [q, message] of bad) {
    it(`answers 422 for ${q}`, async () => {
      const res = await send("GET", `/api/v1/studies/${studyId}/donor-results?${q}`, "scientist");
      expect(res.status).toBe(422);
      expect((await res.json()).detail).toBe(message);
    });
  }
});

describe("committing an upload (COPY in one transaction)", () => {
  let studyId: string;
  beforeAll(async () => {
    studyId = await openStudy("Commit");
  });

  it("stores text exactly as written, tabs, backslashes, line ends and a leading = included", async () => {
    // Quoted CSV fields (RFC 4180) may hold the characters that COPY's text format escapes.
    const csv = [HEADER, '"T\tAB",F,30,,,5.0,', '"BACK\\SLASH",M,31,,,5.1,', '"LINE\nEND",F,32,,,5.2,', '"=HYPERLINK(""x"")",M,33,,,5.3,', '"\\N",F,34,,,5.4,'].join("\n");
    const { id } = await (await upload(studyId, "scientist", csv)).json();
    const res = await send("POST", `/api/v1/studies/${studyId}/uploads/${id}/commit`, "scientist");
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ status: "committed", stored: 5 });
    const rows = (await pool.query("SELECT donor_code, value, birth_date FROM donor_results WHERE upload_id = $1 ORDER BY row_number", [id])).rows;
    expect(rows).toEqual([
      { donor_code: "T\tAB", value: 5, birth_date: null },
      { donor_code: "BACK\\SLASH", value: 5.1, birth_date: null },
      { donor_code: "LINE\nEND", value: 5.2, birth_date: null },
      { donor_code: '=HYPERLINK("x")', value: 5.3, birth_date: null },
      { donor_code: "\\N", value: 5.4, birth_date: null },
    ]);
  });

  it("answers one of two simultaneous commits of the same file with 409 and stores the rows once", async () => {
    const csv = [HEADER, "S1,F,30,,,5.0,", "S2,M,40,,,5.5,"].join("\n");
    const first = (await (await upload(studyId, "scientist", csv)).json()).id;
    const second = (await (await upload(studyId, "director", csv)).json()).id;
    const before = await counts();
    const answers = await Promise.all([first, second].map((id) => send("POST", `/api/v1/studies/${studyId}/uploads/${id}/commit`, "scientist")));
    expect(answers.map((a) => a.status).sort()).toEqual([200, 409]);
    const refused = answers.find((a) => a.status === 409)!;
    expect((await refused.json()).detail).toMatch(/^The same file \((donors\.csv, )?by its SHA-256\) is already committed in this study/);
    expect(await counts()).toEqual({ ...before, donor_results: before.donor_results + 2, audit_events: before.audit_events + 1 });
  });

  it("stores nothing when a row fails in the database: the upload stays pending, no audit event", async () => {
    const csv = [HEADER, "F1,F,30,,,5.0,", "F2,M,40,,,5.5,", "F3,F,50,,,6.0,"].join("\n");
    const { id } = await (await upload(studyId, "scientist", csv)).json();
    // The check never lets such a sex through; written straight into the pending rows, the
    // donor_results_sex constraint refuses it during the COPY, after the first row went in.
    await pool.query(`UPDATE uploads SET pending_rows = jsonb_set(pending_rows, '{2,2}', '"X"') WHERE id = $1`, [id]);
    const before = await counts();
    const res = await send("POST", `/api/v1/studies/${studyId}/uploads/${id}/commit`, "scientist");
    expect(res.status).toBe(500);
    expect(await counts()).toEqual(before);
    const [row] = (await pool.query("SELECT status, stored_rows, jsonb_array_length(pending_rows) AS pending FROM uploads WHERE id = $1", [id])).rows;
    expect(row).toEqual({ status: "pending", stored_rows: null, pending: 3 });
  });

  it("commits an upload kept pending as row objects, the form used before rows were kept as tuples", async () => {
    const { id } = await (await upload(studyId, "scientist", [HEADER, "O1,F,30,,,5.0,"].join("\n"))).json();
    const legacy = [
      { row: 1, donorCode: "O1", sex: "F", ageYears: 30, ageDays: 10958, ageFrom: "age_years", birthDate: null, collectedOn: "2026-01-05", value: 5, censoring: null, unit: "mmol/L", conversion: null },
      { row: 2, donorCode: "O2", sex: "M", ageYears: 41, ageDays: 14975, ageFrom: "age_years", birthDate: null, collectedOn: null, value: 2, censoring: { side: "below", inclusive: true }, unit: "mmol/L", conversion: { fromUnit: "mg/dL", value: 36 } },
    ];
    await pool.query("UPDATE uploads SET pending_rows = $2::jsonb WHERE id = $1", [id, JSON.stringify(legacy)]);
    const res = await send("POST", `/api/v1/studies/${studyId}/uploads/${id}/commit`, "scientist");
    expect(await res.json()).toEqual({ status: "committed", stored: 2 });
    const rows = (
      await pool.query(
        "SELECT row_number, donor_code, sex, age_years, age_days, collected_on, value, censoring_side, censoring_inclusive, original_value, original_unit FROM donor_results WHERE upload_id = $1 ORDER BY row_number",
        [id],
      )
    ).rows;
    expect(rows).toEqual([
      { row_number: 1, donor_code: "O1", sex: "F", age_years: 30, age_days: 10958, collected_on: "2026-01-05", value: 5, censoring_side: null, censoring_inclusive: null, original_value: null, original_unit: null },
      { row_number: 2, donor_code: "O2", sex: "M", age_years: 41, age_days: 14975, collected_on: null, value: 2, censoring_side: "below", censoring_inclusive: true, original_value: 36, original_unit: "mg/dL" },
    ]);
  });
});
