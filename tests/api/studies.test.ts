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
