import { createHash, randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL } from "../support/http-session";
import { donorCsv, generatedRows, openStudy, sender, signInAll, tableCounts, uploadAndCommit, type Cookies } from "../support/studies";

const { pool } = testDatabase();
afterAll(() => pool.end());

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

const CODE = `LM${Date.now().toString(36).toUpperCase()}`.slice(0, 16);
const TAG = `${Date.now()}.${Math.floor(Math.random() * 1e6)}`;
/** Two connections share the first contact (one message to it), one has its own, one is revoked. */
const SHARED = `lis.shared.${TAG}@integration.example`;
const OWN = `lis.own.${TAG}@integration.example`;
const REVOKED = `lis.revoked.${TAG}@integration.example`;
const TABLES = ["interval_versions", "signatures", "outbox", "audit_events"];

let cookies: Cookies;
let send: ReturnType<typeof sender>;
let studyId: string;
let estimateId: string;
const director = demoUser("director");

/** An LIS connection as the admin routes store one: a name, a contact, the key's prefix and SHA-256. */
async function connection(name: string, contactEmail: string, revoked = false): Promise<void> {
  const key = `bwk_${randomBytes(32).toString("base64url")}`;
  await pool.query(
    `INSERT INTO lis_connections (name, contact_email, key_prefix, key_sha256, revoked_at) VALUES ($1, $2, $3, $4, $5)`,
    [name, contactEmail, key.slice(0, 12), createHash("sha256").update(key).digest("hex"), revoked ? new Date() : null],
  );
}

/** Every contact e-mail of a connection not revoked, as written by anyone (the demo's, other tests'), each once. */
async function activeContacts(): Promise<string[]> {
  return (await pool.query("SELECT DISTINCT lower(trim(contact_email)) AS email FROM lis_connections WHERE revoked_at IS NULL ")).rows.map((r) => r.email).sort();
}

async function mails(entityId: string, kind: string): Promise<{ recipients: string[]; subject: string; text: string }[]> {
  return (await pool.query("SELECT recipients, subject, text FROM outbox WHERE entity_id = $1 AND kind = $2 ORDER BY created_at", [entityId, kind])).rows;
}

async function post(path: string, body?: unknown): Promise<Doc> {
  const res = await send("POST", path, path.endsWith("/submit") ? "scientist" : "director", body);
  const json = await res.json();
  expect(res.status, JSON.stringify(json)).toBe(200);
  return json;
}

/** A version drafted and submitted by the scientist, signed by the demo director through the routes. */
async function inForce(): Promise<Doc> {
  const res = await send("POST", "/api/v1/interval-versions", "scientist", {
    analyte: CODE, study: studyId, partitions: [{ estimate: estimateId, method: "nonparametric" }], criticalLow: 1, criticalHigh: 20,
  });
  expect(res.status).toBe(201);
  const v = await res.json();
  await post(`/api/v1/interval-versions/${v.id}/submit`);
  return post(`/api/v1/interval-versions/${v.id}/sign`, { password: director.password, email: director.email, meaning: "approved_for_clinical_use" });
}

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  await connection(`Ward LIS ${TAG}`, SHARED);
  await connection(`Ward LIS backup ${TAG}`, SHARED.toUpperCase());
  await connection(`Outreach LIS ${TAG}`, OWN);
  await connection(`Retired LIS ${TAG}`, REVOKED, true);
  const analyte = await send("POST", "/api/v1/analytes", "scientist", { code: CODE, name: "LIS mail analyte", unit: "mmol/L", decimals: 2 });
  expect(analyte.status).toBe(201);
  studyId = await openStudy(send, "LIS mail study", "scientist", CODE);
  await uploadAndCommit(cookies, studyId, donorCsv(generatedRows(150, 29, "L")));
  const estimated = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { outliers: "none", seed: 3 });
  expect(estimated.status).toBe(201);
  estimateId = (await estimated.json()).id;
}, 120_000);

describe('"version.in_force" and "version.withdrawn" to LIS connection contacts', () => {
  let first: Doc;
  let second: Doc;

  it("queues one message per distinct contact of the active connections when a version is signed off, none to a revoked one", async () => {
    const before = await tableCounts(pool, TABLES);
    first = await inForce();
    const contacts = await activeContacts();
    expect(contacts).toEqual(expect.arrayContaining([SHARED, OWN]));
    expect(contacts).not.toContain(REVOKED);
    const rows = await mails(first.id, "version.in_force");
    expect(rows.every((r) => r.recipients.length === 1)).toBe(true);
    expect(rows.map((r) => r.recipients[0]).sort()).toEqual([...contacts].sort());
    expect(rows.flatMap((r) => r.recipients)).not.toContain(REVOKED);
    const [p] = first.partitions;
    const mail = rows.find((r) => r.recipients[0] === OWN)!;
    expect(mail.subject).toBe(`Bellwether: ${CODE} reference interval version ${first.number} in force`);
    expect(mail.text).toContain(`Version ${first.number} of ${CODE} (LIS mail analyte) was signed off and is in force from ${first.effectiveFrom}.`);
    expect(mail.text).toContain(`- All patients: ${p.low.toFixed(2)} to ${p.high.toFixed(2)} mmol/L`);
    expect(mail.text).toContain("Critical limits (flags LL and HH): below 1.00, above 20.00 mmol/L.");
    expect(mail.text).toContain(`GET /api/v1/analytes/${CODE}/intervals`);
    // "version.submitted", the staff's "version.signed" and one "version.in_force" per contact.
    expect((await tableCounts(pool, TABLES)).outbox).toBe(before.outbox + 2 + contacts.length);
  });

  it("tells them the reinstated version is in force again when a withdrawal reinstates the previous one", async () => {
    second = await inForce();
    const res = await send("POST", `/api/v1/interval-versions/${second.id}/withdraw`, "director", {
      password: director.password, reason: "Wrong calibrator lot.", reinstatePrevious: true,
    });
    expect(res.status, await res.clone().text()).toBe(200);
    const contacts = await activeContacts();
    const back = await mails(first.id, "version.in_force");
    // The first signing's messages and the reinstatement's, one per contact each.
    expect(back).toHaveLength(2 * contacts.length);
    const reinstated = back.filter((m) => m.text.includes("is back in force"));
    expect(reinstated.map((m) => m.recipients[0]).sort()).toEqual(contacts);
    expect(reinstated[0].text).toContain(`version ${second.number} was withdrawn (reason given: Wrong calibrator lot.)`);
    // No LIS contact is told of the withdrawal itself: a version is in force.
    expect((await mails(second.id, "version.withdrawn")).flatMap((m) => m.recipients)).not.toContain(OWN);
  });

  it('queues "version.withdrawn" to each contact when a withdrawal leaves nothing in force', async () => {
    const before = await tableCounts(pool, TABLES);
    const res = await send("POST", `/api/v1/interval-versions/${first.id}/withdraw`, "director", { password: director.password, reason: "Method discontinued." });
    expect(res.status, await res.clone().text()).toBe(200);
    const contacts = await activeContacts();
    const lis = (await mails(first.id, "version.withdrawn")).filter((m) => m.recipients.length === 1 && contacts.includes(m.recipients[0]));
    expect(lis.map((m) => m.recipients[0]).sort()).toEqual(contacts);
    expect(lis[0].subject).toBe(`Bellwether: ${CODE} reference interval version ${first.number} withdrawn, none in force`);
    expect(lis[0].text).toContain(`No reference interval of ${CODE} is in force now.`);
    expect(lis[0].text).toContain(`answers every ${CODE} item sent to POST /api/v1/scores`);
    expect((await mails(first.id, "version.withdrawn")).flatMap((m) => m.recipients)).not.toContain(REVOKED);
    // The staff's message and one per contact.
    expect((await tableCounts(pool, TABLES)).outbox).toBe(before.outbox + 1 + contacts.length);
  });

  it("queues nothing when a signing is refused", async () => {
    const res = await send("POST", "/api/v1/interval-versions", "scientist", { analyte: CODE, study: studyId, partitions: [{ estimate: estimateId, method: "nonparametric" }] });
    const v = await res.json();
    await post(`/api/v1/interval-versions/${v.id}/submit`);
    const before = await tableCounts(pool, TABLES);
    const refused = await fetch(`${BASE_URL}/api/v1/interval-versions/${v.id}/sign`, {
      method: "POST",
      headers: { cookie: cookies.scientist, "content-type": "application/json" },
      body: JSON.stringify({ password: demoUser("scientist").password, meaning: "approved_for_clinical_use" }),
    });
    expect(refused.status).toBe(403);
    expect(await tableCounts(pool, TABLES)).toEqual(before);
  });
});
