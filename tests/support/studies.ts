/**
 * Helpers for the integration tests of study routes: signed-in requests per role, table row
 * counts, and a study filled with donor results through the real upload and commit routes.
 */
import { createHash } from "node:crypto";
import type { Pool } from "pg";
import { expect } from "vitest";
import type { Role } from "@/db/schema";
import { createRandom } from "@/lib/stats/random";
import { demoUser } from "./demo-users";
import { BASE_URL, signInOverHttp } from "./http-session";

export const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];

/** DESIGN.md's roles table written out: studies, donor data, estimates and drafts are for directors and scientists only. */
export const MAY_WORK: Record<Role, boolean> = { admin: false, director: true, scientist: true, clinician: false };

export type Cookies = Record<Role, string>;

export async function signInAll(): Promise<Cookies> {
  const cookies = {} as Cookies;
  for (const role of ROLES) cookies[role] = await signInOverHttp(demoUser(role).email, demoUser(role).password);
  return cookies;
}

export function sender(cookies: Cookies) {
  return (method: string, path: string, role: Role | null, body?: unknown): Promise<Response> => {
    const headers: Record<string, string> = {};
    if (role) headers.cookie = cookies[role];
    if (body !== undefined) headers["content-type"] = "application/json";
    return fetch(`${BASE_URL}${path}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
  };
}

/** Row counts of the given tables, to show what a request changed. */
export async function tableCounts(pool: Pool, tables: readonly string[]): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of tables) out[t] = (await pool.query(`SELECT count(*)::int AS n FROM ${t}`)).rows[0].n;
  return out;
}

export interface DonorRow {
  code: string;
  sex: "F" | "M";
  age: number;
  /** As written in the file: "5.12", or "<0.50" for a censored value. */
  value: string;
}

export const DONOR_HEADER = "donor_code,sex,age_years,birth_date,collected_on,value,unit";

export function donorCsv(rows: readonly DonorRow[]): string {
  const quote = (s: string) => (/[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  return [DONOR_HEADER, ...rows.map((r) => [quote(r.code), r.sex, r.age, "", "2026-01-05", r.value, ""].join(","))].join("\n") + "\n";
}

/**
 * `n` healthy-donor rows from a seeded generator: log-normal values (median about 5, SD of ln
 * 0.12, Box-Muller on the seeded uniform), sexes alternating, ages 18 to 79, written with two
 * decimals so that the file and the database hold the same numbers.
 */
export function generatedRows(n: number, seed: number, prefix = "D"): DonorRow[] {
  const random = createRandom(seed);
  const rows: DonorRow[] = [];
  for (let i = 0; i < n; i++) {
    const u1 = 1 - random.nextFloat();
    const u2 = random.nextFloat();
    const z = Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
    rows.push({ code: `${prefix}${i + 1}`, sex: i % 2 === 0 ? "F" : "M", age: 18 + random.nextInt(62), value: (5 * Math.exp(0.12 * z)).toFixed(2) });
  }
  return rows;
}

export function sha256(text: string): string {
  return createHash("sha256").update(text).digest("hex");
}

export async function openStudy(send: ReturnType<typeof sender>, title: string, role: Role = "scientist", analyte = "GLU"): Promise<string> {
  const res = await send("POST", "/api/v1/studies", role, { analyte, title, method: "Hexokinase", specimen: "plasma" });
  expect(res.status).toBe(201);
  return (await res.json()).id;
}

/** Uploads a CSV through the real route and commits it; returns the upload id. */
export async function uploadAndCommit(cookies: Cookies, studyId: string, csv: string, name = "donors.csv"): Promise<string> {
  const form = new FormData();
  form.set("file", new Blob([csv]), name);
  const res = await fetch(`${BASE_URL}/api/v1/studies/${studyId}/uploads`, { method: "POST", headers: { cookie: cookies.scientist }, body: form });
  const report = await res.json();
  expect(res.status, JSON.stringify(report)).toBe(201);
  expect(report.rows.invalid, JSON.stringify(report.problems)).toBe(0);
  const commit = await fetch(`${BASE_URL}/api/v1/studies/${studyId}/uploads/${report.id}/commit`, {
    method: "POST",
    headers: { cookie: cookies.scientist },
  });
  expect(commit.status).toBe(200);
  return report.id;
}

/** Sets a donor result aside as the exclusions routes would, straight in the database. */
export async function excludeDirectly(pool: Pool, { studyId, donorCode, reason }: { studyId: string; donorCode: string; reason: string }): Promise<{ exclusionId: string; donorResultId: number }> {
  const [row] = (
    await pool.query(
      `INSERT INTO exclusions (study_id, donor_result_id, source, reason)
       SELECT $1, id, 'manual', $3 FROM donor_results WHERE study_id = $1 AND donor_code = $2
       RETURNING id, donor_result_id`,
      [studyId, donorCode, reason],
    )
  ).rows;
  return { exclusionId: row.id, donorResultId: Number(row.donor_result_id) };
}
