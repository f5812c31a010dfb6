import fs from "node:fs";
import path from "node:path";
import type { Pool } from "pg";
import { expect } from "vitest";
import type { Role } from "@/db/schema";
import { demoUser } from "./demo-users";
import { BASE_URL, signInOverHttp } from "./http-session";

/** DESIGN.md's roles table written out: studies and donor-level data are for directors and scientists only. */
export const MAY_WORK: Record<Role, boolean> = { admin: false, director: true, scientist: true, clinician: false };
export const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];

export const FIXTURES = path.resolve(__dirname, "..", "fixtures");

/** Signs in every demo role once and sends JSON requests as one of them (null: anonymous). */
export function studyApi(pool: Pool) {
  const cookies = {} as Record<Role, string>;
  async function signInAll() {
    for (const role of ROLES) cookies[role] = await signInOverHttp(demoUser(role).email, demoUser(role).password);
  }

  function send(method: string, urlPath: string, role: Role | null, body?: unknown): Promise<Response> {
    const headers: Record<string, string> = {};
    if (role) headers.cookie = cookies[role];
    if (body !== undefined) headers["content-type"] = "application/json";
    return fetch(`${BASE_URL}${urlPath}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
  }

  /** Row counts of the tables a screening request may touch, to show what it changed. */
  async function counts(): Promise<Record<string, number>> {
    const tables = ["studies", "donor_results", "exclusions", "outlier_decisions", "partition_assessments", "audit_events"];
    const out: Record<string, number> = {};
    for (const t of tables) out[t] = (await pool.query(`SELECT count(*)::int AS n FROM ${t}`)).rows[0].n;
    return out;
  }

  /** Opens a study for GLU as the scientist and stores the CSV's rows as its donor results. */
  async function studyWithDonors(title: string, csv: string): Promise<{ id: string; ids: Record<string, number> }> {
    const opened = await send("POST", "/api/v1/studies", "scientist", { analyte: "GLU", title });
    expect(opened.status).toBe(201);
    const { id } = await opened.json();
    const form = new FormData();
    form.set("file", new Blob([csv]), `${title}.csv`);
    const checked = await fetch(`${BASE_URL}/api/v1/studies/${id}/uploads`, { method: "POST", headers: { cookie: cookies.scientist }, body: form });
    expect(checked.status).toBe(201);
    const report = await checked.json();
    expect(report.rows.invalid).toBe(0);
    const committed = await send("POST", `/api/v1/studies/${id}/uploads/${report.id}/commit`, "scientist");
    expect(committed.status).toBe(200);
    const rows = (await pool.query("SELECT id, donor_code FROM donor_results WHERE study_id = $1", [id])).rows;
    return { id, ids: Object.fromEntries(rows.map((r) => [r.donor_code, Number(r.id)])) };
  }

  async function expectProblem(res: Response, status: number, detail: string) {
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    const body = await res.json();
    expect({ status: res.status, detail: body.detail }).toEqual({ status, detail });
  }

  return { cookies, signInAll, send, counts, studyWithDonors, expectProblem };
}

/** The template's header; rows give donor code, sex, age in years and value. */
export const TEMPLATE_HEADER = "donor_code,sex,age_years,birth_date,collected_on,value,unit";

export function donorCsv(rows: { code: string; sex: string; age: number; value: string }[]): string {
  return [TEMPLATE_HEADER, ...rows.map((r) => `${r.code},${r.sex},${r.age},,,${r.value},`)].join("\n");
}

/** A fixture CSV with donor/donor_code, sex, value (and age_years when present). */
export function readFixtureRows(file: string): { code: string; sex: string; age: number; value: string }[] {
  const [header, ...lines] = fs.readFileSync(path.join(FIXTURES, file), "utf8").trim().split(/\r?\n/);
  const cols = header.split(",");
  const at = (name: string) => cols.indexOf(name);
  return lines.map((line, i) => {
    const cells = line.split(",");
    const code = cells[at("donor") >= 0 ? at("donor") : at("donor_code")];
    const age = at("age_years") >= 0 ? Number(cells[at("age_years")]) : 20 + (i % 50);
    return { code, sex: cells[at("sex")], age, value: cells[at("value")] };
  });
}
