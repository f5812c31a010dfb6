/**
 * Helpers for the scoring tests: analytes of a test's own with a version put in force through the
 * real submit and sign routes, so that scores can be checked against published models
 * (METHODS.md's zlog and Box-Cox examples) that no demo study produces.
 */
import type { Pool } from "pg";
import { expect } from "vitest";
import { demoUser } from "./demo-users";
import { BASE_URL } from "./http-session";
import type { Cookies } from "./studies";

export interface PartitionSpec {
  sex?: "F" | "M" | null;
  ageFromDays?: number | null;
  ageToDays?: number | null;
  low: number | null;
  high: number | null;
  method: "nonparametric" | "parametric" | "robust" | "adopted" | "lms";
  n: number;
  model: Record<string, unknown>;
}

/** A fresh analyte code of at most 16 characters: the prefix and a time-based suffix. */
export function uniqueCode(prefix: string): string {
  return `${prefix}${Date.now().toString(36).slice(-5)}${Math.floor(Math.random() * 36 ** 2).toString(36)}`.toUpperCase().slice(0, 16);
}

export async function createAnalyte(
  cookies: Cookies,
  body: { code: string; name: string; unit: string; decimals: number; loinc?: string; reviewMonths?: number },
): Promise<void> {
  const res = await fetch(`${BASE_URL}/api/v1/analytes`, {
    method: "POST",
    headers: { cookie: cookies.scientist, "content-type": "application/json" },
    body: JSON.stringify({ specimen: "serum", ...body }),
  });
  expect(res.status, await res.clone().text()).toBe(201);
}

async function post(path: string, cookie: string, body?: unknown): Promise<Record<string, unknown>> {
  const res = await fetch(`${BASE_URL}${path}`, {
    method: "POST",
    headers: { cookie, ...(body === undefined ? {} : { "content-type": "application/json" }) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const json = await res.json();
  expect(res.status, JSON.stringify(json)).toBe(200);
  return json;
}

/**
 * Drafts a version of `code` with the given partitions straight in the table (as the scientist,
 * the way the app's role may insert drafts), then submits it as the scientist and signs it as the
 * demo director through the API. Returns the version's id.
 */
export async function putInForce(pool: Pool, cookies: Cookies, code: string, partitions: PartitionSpec[], { directorCookie = cookies.director } = {}): Promise<string> {
  const scientist = demoUser("scientist");
  const director = demoUser("director");
  const client = await pool.connect();
  let versionId: string;
  try {
    await client.query("BEGIN");
    const { rows } = await client.query(
      `INSERT INTO interval_versions (analyte_id, number, unit, decimals, created_by, updated_by)
       SELECT a.id, COALESCE((SELECT max(number) FROM interval_versions WHERE analyte_id = a.id), 0) + 1, a.unit, a.decimals, u.id, u.id
       FROM analytes a, users u WHERE a.code = $1 AND u.email = $2 RETURNING id`,
      [code, scientist.email],
    );
    versionId = rows[0].id;
    for (const [i, p] of partitions.entries()) {
      await client.query(
        `INSERT INTO interval_partitions (version_id, position, sex, age_from_days, age_to_days, low, high, method, n, model)
         VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10)`,
        [versionId, i + 1, p.sex ?? null, p.ageFromDays ?? null, p.ageToDays ?? null, p.low, p.high, p.method, p.n, JSON.stringify(p.model)],
      );
    }
    await client.query("COMMIT");
  } catch (err) {
    await client.query("ROLLBACK");
    throw err;
  } finally {
    client.release();
  }
  await post(`/api/v1/interval-versions/${versionId}/submit`, cookies.scientist);
  const signed = await post(`/api/v1/interval-versions/${versionId}/sign`, directorCookie, {
    meaning: "approved_for_clinical_use",
    password: director.password,
    email: director.email,
  });
  expect(signed.state).toBe("in_force");
  return versionId;
}

/** Polls `check` until it returns true, at most `ms` milliseconds; returns how long it took. */
export async function waitFor(check: () => Promise<boolean>, ms = 5000, stepMs = 50): Promise<number> {
  const start = Date.now();
  for (;;) {
    if (await check()) return Date.now() - start;
    if (Date.now() - start > ms) throw new Error(`not within ${ms} ms`);
    await new Promise((r) => setTimeout(r, stepMs));
  }
}
