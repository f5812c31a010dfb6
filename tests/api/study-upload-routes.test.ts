import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";

// The routes the study pages add: the upload preview, the blank template, the progress (NDJSON)
// variant of an upload, and closing a study.

const { pool } = testDatabase();
afterAll(() => pool.end());

/** DESIGN.md's roles table written out: studies and donor-level data are for directors and scientists only. */
const MAY_WORK: Record<Role, boolean> = { admin: false, director: true, scientist: true, clinician: false };
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];
const REFUSED: Role[] = ROLES.filter((r) => !MAY_WORK[r]);

const cookies = {} as Record<Role, string>;
beforeAll(async () => {
  for (const role of ROLES) cookies[role] = await signInOverHttp(demoUser(role).email, demoUser(role).password);
});

function send(method: string, path: string, role: Role | null, headers: Record<string, string> = {}): Promise<Response> {
  return fetch(`${BASE_URL}${path}`, { method, headers: { ...(role ? { cookie: cookies[role] } : {}), ...headers } });
}

function postForm(path: string, role: Role, file: string | Uint8Array<ArrayBuffer>, fields: Record<string, string> = {}, headers: Record<string, string> = {}) {
  const form = new FormData();
  form.set("file", new Blob([file]), "donors.csv");
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  return fetch(`${BASE_URL}${path}`, { method: "POST", headers: { cookie: cookies[role], ...headers }, body: form });
}

/** Row counts of the tables these routes could touch, to show what a request changed. */
async function counts(): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of ["studies", "uploads", "donor_results", "audit_events"]) {
    out[t] = (await pool.query(`SELECT count(*)::int AS n FROM ${t}`)).rows[0].n;
  }
  return out;
}

async function openStudy(title: string): Promise<string> {
  const res = await fetch(`${BASE_URL}/api/v1/studies`, {
    method: "POST",
    headers: { cookie: cookies.scientist, "content-type": "application/json" },
    body: JSON.stringify({ analyte: "GLU", title }),
  });
  expect(res.status).toBe(201);
  return (await res.json()).id;
}

const HEADER = "donor_code,sex,age_years,birth_date,collected_on,value,unit";
const rowsCsv = (n: number, prefix = "D") =>
  [HEADER, ...Array.from({ length: n }, (_, i) => `${prefix}${i + 1},${i % 2 ? "M" : "F"},${20 + (i % 50)},,2026-01-05,${(4 + (i % 20) / 10).toFixed(1)},`)].join("\n");
/** A laboratory export's headers: the suggestion finds all but the value column. */
const OTHER_HEADERS = ["Sample ID,Gender,Age,Fasting glucose,Units", "S1,female,34,5.1,mmol/L", "S2,male,51,4.8,mmol/L"].join("\n");
const MISSING = "00000000-0000-4000-8000-000000000000";

describe("GET /api/v1/uploads/template", () => {
  for (const role of ROLES) {
    it(`${MAY_WORK[role] ? "gives" : "refuses"} the ${role} the blank template`, async () => {
      const before = await counts();
      const csv = await send("GET", "/api/v1/uploads/template?format=csv&analyte=GLU", role);
      const xlsx = await send("GET", "/api/v1/uploads/template?format=xlsx", role);
      if (MAY_WORK[role]) {
        expect(csv.status).toBe(200);
        expect(csv.headers.get("content-type")).toBe("text/csv; charset=utf-8");
        expect(csv.headers.get("content-disposition")).toBe('attachment; filename="bellwether-donor-results-GLU.csv"');
        // The template's columns (issue 7) and its example row in GLU's unit (db/seed.ts: mmol/L).
        expect(await csv.text()).toBe(`${HEADER}\r\nEXAMPLE,F,42,,2026-03-02,4.5,mmol/L\r\n`);
        expect(xlsx.status).toBe(200);
        expect(xlsx.headers.get("content-type")).toBe("application/vnd.openxmlformats-officedocument.spreadsheetml.sheet");
        expect(xlsx.headers.get("content-disposition")).toBe('attachment; filename="bellwether-donor-results.xlsx"');
        const bytes = new Uint8Array(await xlsx.arrayBuffer());
        expect([...bytes.slice(0, 4)]).toEqual([0x50, 0x4b, 0x03, 0x04]); // a ZIP container, as every XLSX
      } else {
        expect(csv.status).toBe(403);
        expect((await csv.json()).detail).toBe(`Your role (${role}) may not do this.`);
        expect(xlsx.status).toBe(403);
      }
      expect(await counts()).toEqual(before);
    });
  }

  it("answers 401 without a session, and 422 for an unknown format or analyte", async () => {
    expect((await send("GET", "/api/v1/uploads/template?format=csv", null)).status).toBe(401);
    const format = await send("GET", "/api/v1/uploads/template?format=pdf", "scientist");
    expect(format.status).toBe(422);
    expect((await format.json()).detail).toBe("format: format is csv or xlsx.");
    const analyte = await send("GET", "/api/v1/uploads/template?format=csv&analyte=NOPE", "scientist");
    expect(analyte.status).toBe(422);
    expect((await analyte.json()).detail).toBe("There is no analyte with the code NOPE.");
  });
});

describe("POST /api/v1/studies/{id}/uploads/preview", () => {
  let studyId: string;
  beforeAll(async () => {
    studyId = await openStudy("Preview");
  });
  const preview = (role: Role, file: string | Uint8Array<ArrayBuffer>, fields: Record<string, string> = {}) =>
    postForm(`/api/v1/studies/${studyId}/uploads/preview`, role, file, fields);

  it("answers the headers, the mapping and the first 10 rows of a file in the template's columns, storing nothing", async () => {
    const before = await counts();
    const res = await preview("scientist", rowsCsv(12));
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({
      fileName: "donors.csv",
      format: "csv",
      separator: ",",
      headers: HEADER.split(","),
      matchesTemplate: true,
      incomplete: null,
      mapping: { donor_code: "donor_code", sex: "sex", age_years: "age_years", birth_date: "birth_date", collected_on: "collected_on", value: "value", unit: "unit" },
    });
    expect(body.rows).toHaveLength(10);
    expect(body.rows[0]).toEqual({ row: 1, cells: { donor_code: "D1", sex: "F", age_years: "20", birth_date: "", collected_on: "2026-01-05", value: "4.0", unit: "" } });
    expect(body.fileRows[9]).toEqual({ row: 10, cells: ["D10", "M", "29", "", "2026-01-05", "4.9", ""] });
    expect(await counts()).toEqual(before);
  });

  it("suggests a mapping for other headers and says what is still missing", async () => {
    const before = await counts();
    const res = await preview("director", OTHER_HEADERS);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.matchesTemplate).toBe(false);
    // "Fasting glucose" names no column; the guess leaves value for the scientist to choose.
    expect(body.suggested).toEqual({ donor_code: "Sample ID", sex: "Gender", age_years: "Age", unit: "Units" });
    expect(body.incomplete).toBe(
      `no column of the file is mapped to value; name the file's header for it in the mapping (its headers: "Sample ID", "Gender", "Age", "Fasting glucose", "Units")`,
    );
    expect(body.rows[0].cells).toEqual({ donor_code: "S1", sex: "female", age_years: "34", birth_date: null, collected_on: null, value: null, unit: "mmol/L" });
    expect(await counts()).toEqual(before);
  });

  it("applies the mapping sent with the file", async () => {
    const mapping = { donor_code: "Sample ID", sex: "Gender", age_years: "Age", value: "Fasting glucose", unit: "Units" };
    const res = await preview("scientist", OTHER_HEADERS, { mapping: JSON.stringify(mapping) });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.incomplete).toBeNull();
    expect(body.rows[1].cells).toEqual({ donor_code: "S2", sex: "male", age_years: "51", birth_date: null, collected_on: null, value: "4.8", unit: "mmol/L" });
  });

  for (const role of REFUSED) {
    it(`refuses the ${role} with 403`, async () => {
      const before = await counts();
      const res = await preview(role, rowsCsv(2));
      expect(res.status).toBe(403);
      expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      expect(await counts()).toEqual(before);
    });
  }

  const refused: [string, () => Promise<Response>, number, string][] = [
    ["an unknown study", () => postForm(`/api/v1/studies/${MISSING}/uploads/preview`, "scientist", rowsCsv(2)), 404, `There is no study with the id ${MISSING}.`],
    ["a binary file", () => preview("scientist", new Uint8Array([0, 1, 2, 3, 4])), 415, "the file is neither CSV text nor an Excel workbook (.xlsx)"],
    ["an empty file", () => preview("scientist", ""), 422, "the file is empty"],
    [
      "a mapping naming a header the file lacks",
      () => preview("scientist", OTHER_HEADERS, { mapping: JSON.stringify({ value: "Result" }) }),
      422,
      `the mapping gives the header "Result" for value, but the file has no such header (its headers: "Sample ID", "Gender", "Age", "Fasting glucose", "Units")`,
    ],
    ["a file over 20 MB", () => preview("scientist", new Uint8Array(21 * 1024 * 1024).fill(65)), 413, "the file is larger than 20 MB; split it into several uploads"],
  ];
  for (const [what, request, status, detail] of refused) {
    it(`answers ${status} for ${what}, storing nothing`, async () => {
      const before = await counts();
      const res = await request();
      expect(res.status).toBe(status);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect((await res.json()).detail).toBe(detail);
      expect(await counts()).toEqual(before);
    });
  }
});

/** Reads an NDJSON body into its lines. */
async function ndjsonLines(res: Response): Promise<Record<string, unknown>[]> {
  const text = await res.text();
  expect(text.endsWith("\n")).toBe(true);
  return text.trimEnd().split("\n").map((line) => JSON.parse(line));
}

describe("POST /api/v1/studies/{id}/uploads with Accept: application/x-ndjson", () => {
  let studyId: string;
  beforeAll(async () => {
    studyId = await openStudy("Progress");
  });
  const ndjson = { accept: "application/x-ndjson" };

  it("streams the rows checked, then the pending upload exactly as the JSON answer gives it", async () => {
    const before = await counts();
    const res = await postForm(`/api/v1/studies/${studyId}/uploads`, "scientist", rowsCsv(5000), {}, ndjson);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/x-ndjson");
    const lines = await ndjsonLines(res);
    const progress = lines.slice(0, -1);
    // lib/uploads reports every 2,048 rows checked and once at the end (its onProgress contract).
    expect(progress.map((l) => l.checked)).toEqual([2048, 4096, 5000]);
    expect(progress.at(-1)).toEqual({ checked: 5000, bytesRead: Buffer.byteLength(rowsCsv(5000)), totalBytes: Buffer.byteLength(rowsCsv(5000)) });
    const last = lines.at(-1) as { status: number; upload: Record<string, unknown> };
    expect(last.status).toBe(201);
    expect(last.upload).toMatchObject({ status: "pending", rows: { total: 5000, valid: 5000, invalid: 0 }, problems: [], problemsOmitted: 0, fileName: "donors.csv" });
    expect(await counts()).toEqual({ ...before, uploads: before.uploads + 1, audit_events: before.audit_events + 1 });

    // Without the header the answer is the plain JSON one, with the same fields.
    const plain = await postForm(`/api/v1/studies/${studyId}/uploads`, "scientist", rowsCsv(3, "P"));
    expect(plain.status).toBe(201);
    expect(plain.headers.get("content-type")).toBe("application/json");
    expect(Object.keys(await plain.json())).toEqual(Object.keys(last.upload));
  });

  it("ends the stream with the problem when the file is refused while it is read, storing only the refusal's audit event", async () => {
    const before = await counts();
    const res = await postForm(`/api/v1/studies/${studyId}/uploads`, "director", HEADER, {}, ndjson);
    expect(res.status).toBe(200);
    const lines = await ndjsonLines(res);
    expect(lines.at(-1)).toMatchObject({
      status: 422,
      problem: { status: 422, detail: "the file has a header row but no data rows", uploadError: "no_data_rows" },
    });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
  });

  it("answers refusals found before checking as plain problem+json", async () => {
    for (const role of REFUSED) {
      const before = await counts();
      const res = await postForm(`/api/v1/studies/${studyId}/uploads`, role, rowsCsv(2), {}, ndjson);
      expect(res.status).toBe(403);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect(await counts()).toEqual(before);
    }
    const missing = await postForm(`/api/v1/studies/${MISSING}/uploads`, "scientist", rowsCsv(2), {}, ndjson);
    expect(missing.status).toBe(404);
  });
});

describe("POST /api/v1/studies/{id}/close", () => {
  for (const role of REFUSED) {
    it(`refuses the ${role} with 403, changing nothing`, async () => {
      const id = await openStudy(`Not closed by ${role}`);
      const before = await counts();
      const res = await send("POST", `/api/v1/studies/${id}/close`, role);
      expect(res.status).toBe(403);
      expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      expect(await counts()).toEqual(before);
      expect((await pool.query("SELECT status FROM studies WHERE id = $1", [id])).rows[0].status).toBe("open");
    });
  }

  it("closes the study, cancels its pending upload in the same transaction, audits both, and refuses what follows with 409", async () => {
    const id = await openStudy("To close");
    const pending = await postForm(`/api/v1/studies/${id}/uploads`, "scientist", rowsCsv(4));
    expect(pending.status).toBe(201);
    const upload = await pending.json();
    const before = await counts();

    const res = await send("POST", `/api/v1/studies/${id}/close`, "director");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toEqual({
      id,
      status: "closed",
      closedAt: expect.stringMatching(/^\d{4}-\d{2}-\d{2}T/),
      closedBy: { id: expect.any(String), name: demoUser("director").name },
      cancelledUploads: [{ id: upload.id, fileName: "donors.csv" }],
    });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 2 });
    const events = (await pool.query("SELECT action, entity_id FROM audit_events WHERE entity_id IN ($1, $2) ORDER BY id", [id, upload.id])).rows;
    expect(events.slice(-2)).toEqual([
      { action: "upload.cancelled", entity_id: upload.id },
      { action: "study.closed", entity_id: id },
    ]);
    expect((await pool.query("SELECT status, pending_rows FROM uploads WHERE id = $1", [upload.id])).rows[0]).toEqual({ status: "cancelled", pending_rows: null });

    const afterClose = await counts();
    const again = await send("POST", `/api/v1/studies/${id}/close`, "scientist");
    expect(again.status).toBe(409);
    expect((await again.json()).detail).toBe(`The study is closed: it was closed on ${body.closedAt.slice(0, 10)} and cannot be closed again.`);
    const late = await postForm(`/api/v1/studies/${id}/uploads`, "scientist", rowsCsv(2, "L"));
    expect(late.status).toBe(409);
    expect((await late.json()).detail).toBe("The study is closed: it takes no more uploads.");
    const latePreview = await postForm(`/api/v1/studies/${id}/uploads/preview`, "scientist", rowsCsv(2, "L"));
    expect(latePreview.status).toBe(409);
    const commit = await send("POST", `/api/v1/studies/${id}/uploads/${upload.id}/commit`, "scientist");
    expect(commit.status).toBe(409);
    expect(await counts()).toEqual(afterClose);
  });

  it("answers 404 for an unknown study and 422 for an id that is no UUID", async () => {
    const before = await counts();
    const missing = await send("POST", `/api/v1/studies/${MISSING}/close`, "scientist");
    expect(missing.status).toBe(404);
    expect((await missing.json()).detail).toBe(`There is no study with the id ${MISSING}.`);
    const bad = await send("POST", "/api/v1/studies/nope/close", "scientist");
    expect(bad.status).toBe(422);
    expect((await bad.json()).detail).toBe("id: The study id must be a UUID.");
    expect(await counts()).toEqual(before);
  });
});
