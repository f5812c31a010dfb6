/**
 * The bad-input corpus's helpers: the files of tests/fixtures/bad-input/ (written by
 * scripts/fixtures/bad-input.py), the two large uploads made at test time (never committed),
 * requests as a signed-in role, and the row count of every table of the schema.
 */
import { readFileSync } from "node:fs";
import path from "node:path";
import { Pool } from "pg";
import { expect } from "vitest";
import type { Role } from "@/db/schema";
import { BASE_URL } from "./http-session";

export const CORPUS = path.resolve(__dirname, "..", "fixtures", "bad-input");

export function corpusFile(name: string): Buffer {
  return readFileSync(path.join(CORPUS, name));
}

/**
 * `rows` data rows of valid donor results under the template's header (about 25 bytes a row):
 * with 200,001 rows, one more than an upload may hold.
 */
export function manyRowsCsv(rows: number): Buffer {
  const parts = ["donor_code,sex,age_years,value\n"];
  for (let i = 1; i <= rows; i++) parts.push(`R${i},${i % 2 === 0 ? "M" : "F"},${20 + (i % 60)},${(4 + (i % 300) / 100).toFixed(2)}\n`);
  return Buffer.from(parts.join(""));
}

/** A header row of `columns` columns (the template's four, then c5, c6 …) and one data row. */
export function wideCsv(columns: number): Buffer {
  const extra = Array.from({ length: columns - 4 }, (_, i) => `c${i + 5}`);
  return Buffer.from(`donor_code,sex,age_years,value,${extra.join(",")}\nD1,F,30,5.1${",".repeat(columns - 4)}\n`);
}

/** A valid CSV padded with a long criteria-like column to `bytes` bytes (25 MB: over the 20 MB limit). */
export function largeCsv(bytes: number): Buffer {
  const header = "donor_code,sex,age_years,value,note\n";
  const note = "x".repeat(1000);
  const parts = [header];
  let size = header.length;
  for (let i = 1; size < bytes; i++) {
    const line = `L${i},F,30,5.1,${note}\n`;
    parts.push(line);
    size += line.length;
  }
  return Buffer.from(parts.join("")).subarray(0, bytes);
}

/**
 * The owner's connection (BELLWETHER_MIGRATION_URL): information_schema shows a role only the
 * tables it has a privilege on, and the count must see every table, a new one included.
 */
export function ownerPool(): Pool {
  const url = process.env.BELLWETHER_MIGRATION_URL;
  if (!url) throw new Error("BELLWETHER_MIGRATION_URL is not set: run the integration tests through `npm test`");
  return new Pool({ connectionString: url, max: 2 });
}

export { BACKGROUND_TABLES, countEveryTable, everyTable } from "./table-counts";

/** `before` with the given tables grown by the given numbers. */
export function grown(before: Record<string, number>, changes: Record<string, number> = {}): Record<string, number> {
  const out = { ...before };
  for (const [table, n] of Object.entries(changes)) out[table] = (out[table] ?? 0) + n;
  return out;
}

/**
 * Waits until the score log holds `n` more rows than `before` (the app writes it every second
 * from memory), failing after 15 s; then the count is settled for the next comparison.
 */
export async function scoreLogReaches(owner: Pool, n: number): Promise<void> {
  for (let i = 0; i < 150; i++) {
    const [{ count }] = (await owner.query("SELECT count(*)::int AS count FROM score_log")).rows;
    if (count >= n) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`the score log did not reach ${n} rows`);
}

/**
 * Waits until the score log's count holds still across two of the app's flushes (one a second),
 * so that scores of earlier test files do not land in the middle of a comparison.
 */
export async function scoreLogSettled(owner: Pool): Promise<void> {
  let last = -1;
  for (let i = 0; i < 20; i++) {
    const [{ count }] = (await owner.query("SELECT count(*)::int AS count FROM score_log")).rows;
    if (count === last) return;
    last = count;
    await new Promise((r) => setTimeout(r, 1500));
  }
}

export interface Sent {
  status: number;
  contentType: string | null;
  /** The body parsed as JSON when it is JSON, else null. */
  json: Record<string, unknown> | null;
}

/** The app's origin, sent on every state-changing request as a browser would. */
export const ORIGIN = new URL(BASE_URL).origin;

/**
 * Sends raw bytes or text as a role (null: anonymous) or with an LIS key, with the content type
 * given; answers status, content type and the JSON body.
 */
export async function sendRaw(
  method: string,
  urlPath: string,
  auth: { cookie?: string; key?: string },
  body?: { bytes: string | Uint8Array; type: string | null },
  extraHeaders: Record<string, string> = {},
): Promise<Sent> {
  const headers: Record<string, string> = { origin: ORIGIN, ...extraHeaders };
  if (auth.cookie) headers.cookie = auth.cookie;
  if (auth.key) headers.authorization = `Bearer ${auth.key}`;
  if (body?.type) headers["content-type"] = body.type;
  const res = await fetch(`${BASE_URL}${urlPath}`, {
    method,
    headers,
    body: body === undefined ? undefined : typeof body.bytes === "string" ? body.bytes : new Blob([new Uint8Array(body.bytes)]),
  });
  const contentType = res.headers.get("content-type");
  const text = await res.text();
  let json: Record<string, unknown> | null = null;
  try {
    json = JSON.parse(text);
  } catch {
    json = null;
  }
  return { status: res.status, contentType, json };
}

/** A multipart upload of `file` (named `name`) with the other form fields, as a role's cookie. */
export async function sendUpload(
  urlPath: string,
  cookie: string,
  file: Uint8Array | null,
  name: string,
  fields: Record<string, string> = {},
): Promise<Sent> {
  const form = new FormData();
  if (file) form.set("file", new Blob([new Uint8Array(file)]), name);
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  const res = await fetch(`${BASE_URL}${urlPath}`, { method: "POST", headers: { cookie, origin: ORIGIN }, body: form });
  const contentType = res.headers.get("content-type");
  const text = await res.text();
  let json: Record<string, unknown> | null = null;
  try {
    json = JSON.parse(text);
  } catch {
    json = null;
  }
  return { status: res.status, contentType, json };
}

/** A refusal: the exact status, problem+json (or FHIR's OperationOutcome) and the exact message. */
export function expectRefusal(sent: Sent, status: number, detail: string): void {
  expect({ status: sent.status, contentType: sent.contentType, detail: sent.json?.detail }).toEqual({
    status,
    contentType: "application/problem+json",
    detail,
  });
}

export type Cookies = Record<Role, string>;
