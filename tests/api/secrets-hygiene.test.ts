import { randomBytes } from "node:crypto";
import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { testDatabase, uniqueEmail } from "../support/database";
import { attemptSignIn, BASE_URL, signInOverHttp } from "../support/http-session";
import { createLisConnectionOverHttp, demoLisKey, fetchWithKey } from "../support/lis";
import { createAnalyte, putInForce, uniqueCode } from "../support/scores";
import { actionStateOf, postServerAction } from "../support/server-actions";
import { signInAll, type Cookies } from "../support/studies";

/**
 * Issue 12, "Security basics": passwords, keys and tokens never reach the server's log, an error
 * answer or the audit trail. The test drives every flow that handles one (sign-in, right and
 * wrong; an administrator creating a user and setting a password; one's own password change and
 * the session renewal with its ticket; LIS key creation, scoring with it, a forged and a revoked
 * key; signing a version, with a wrong password first), keeps every secret it used and every
 * answer that was a refusal, and then searches the served app's log file, those answers and every
 * row of every table (the audit trail among them) for each secret.
 */
const { pool } = testDatabase();
afterAll(() => pool.end());

/** Every secret the flows handled, with a label saying what it is. */
const secrets = new Map<string, string>();
/** The text of every refusal (problem bodies, action error states, sign-in error messages). */
const refusals: string[] = [];

const fresh = (label: string) => {
  // Distinctive enough that a hit cannot be chance: 18 random bytes, base64url.
  const secret = `S3cret-${randomBytes(18).toString("base64url")}`;
  secrets.set(secret, label);
  return secret;
};

let cookies: Cookies;
const userEmail = uniqueEmail("secrets");

beforeAll(async () => {
  cookies = await signInAll();
  for (const role of ["admin", "director", "scientist", "clinician"] as const) {
    secrets.set(demoUser(role).password, `the demo ${role}'s password`);
    for (const pair of cookies[role].split("; ")) secrets.set(pair.slice(pair.indexOf("=") + 1), `a cookie of the demo ${role} (${pair.slice(0, pair.indexOf("="))})`);
  }
  secrets.set(demoLisKey(), "the demo LIS key");
});

async function keepIfRefused(res: Response): Promise<Response> {
  if (res.status >= 400) refusals.push(await res.clone().text());
  return res;
}

async function action(name: string, file: string, page: string, cookie: string, fields: Record<string, string>) {
  const res = await postServerAction({ file, name, page, cookie, fields });
  const text = await res.text();
  expect(res.status, text).toBe(200);
  const state = actionStateOf(text);
  if (state?.status === "error") refusals.push(JSON.stringify(state));
  return state;
}

const USERS = "app/(admin)/admin/users/actions.ts";
const ACCOUNT = "app/(workspace)/account/actions.ts";

describe("secrets in the flows that handle them", () => {
  it("signing in: a wrong password, an unknown account, then the right password", async () => {
    for (const [email, password] of [
      [demoUser("scientist").email, fresh("a wrong sign-in password")],
      ["nobody@secrets.example", fresh("the password of an unknown account")],
    ]) {
      const result = await attemptSignIn(email, password, { from: "198.51.100.77" });
      expect(result.ok).toBe(false);
      if (!result.ok) refusals.push(result.message);
    }
  });

  it("an administrator creates a user with a password and later sets another", async () => {
    const tooShort = fresh("a too-short password").slice(0, 10);
    secrets.set(tooShort, "a too-short password");
    const refused = await action("createUserAction", USERS, "/admin/users", cookies.admin, { name: "Secret Keeper", email: userEmail, role: "clinician", password: tooShort });
    expect(refused?.status).toBe("error");

    const first = fresh("the password an administrator chose");
    const created = await action("createUserAction", USERS, "/admin/users", cookies.admin, { name: "Secret Keeper", email: userEmail, role: "clinician", password: first });
    expect(created?.status).toBe("ok");

    // The person signs in with it and replaces it: a wrong current password, two new ones that
    // differ, then the change; the answer carries a session ticket, used to renew the session.
    const session = await signInOverHttp(userEmail, first);
    const wrong = await action("changeOwnPasswordAction", ACCOUNT, "/change-password", session, {
      current: fresh("a wrong current password"),
      next: fresh("a new password (refused)"),
      confirm: fresh("a confirmation that differs"),
    });
    expect(wrong?.status).toBe("error");
    const own = fresh("the person's own password");
    const changed = await action("changeOwnPasswordAction", ACCOUNT, "/change-password", session, { current: first, next: own, confirm: own });
    expect(changed).toMatchObject({ status: "ok", sessionTicket: expect.any(String) });
    const ticket = changed?.sessionTicket as string;
    secrets.set(ticket, "a session ticket");

    for (const [sessionTicket, expected] of [
      [ticket, 200],
      [fresh("a forged session ticket"), null],
    ] as const) {
      const csrf = await fetch(`${BASE_URL}/api/auth/csrf`, { headers: { cookie: session } });
      const { csrfToken } = (await csrf.json()) as { csrfToken: string };
      const csrfCookie = csrf.headers.getSetCookie().map((c) => c.split(";")[0]);
      for (const c of csrfCookie) secrets.set(c.slice(c.indexOf("=") + 1), "a CSRF cookie");
      secrets.set(csrfToken, "a CSRF token");
      const renewed = await fetch(`${BASE_URL}/api/auth/session`, {
        method: "POST",
        headers: { cookie: [session, ...csrfCookie].join("; "), "content-type": "application/json" },
        body: JSON.stringify({ csrfToken, data: { sessionTicket } }),
      });
      for (const c of renewed.headers.getSetCookie()) {
        const value = c.split(";")[0];
        if (value.includes("session-token=") && value.length > 30) secrets.set(value.slice(value.indexOf("=") + 1), "a renewed session token");
      }
      if (expected !== null) expect(renewed.status).toBe(expected);
      else refusals.push(await renewed.text());
    }

    const { rows } = await pool.query("SELECT id FROM users WHERE email = $1", [userEmail]);
    const reset = fresh("a password an administrator set");
    expect(await action("setPasswordAction", USERS, "/admin/users", cookies.admin, { id: rows[0].id, password: reset })).toMatchObject({ status: "ok" });
    const signedIn = await attemptSignIn(userEmail, reset);
    expect(signedIn.ok).toBe(true);
    if (signedIn.ok) for (const pair of signedIn.cookie.split("; ")) secrets.set(pair.slice(pair.indexOf("=") + 1), "a cookie of the new user");
  });

  it("an LIS key: created, used, forged, malformed and revoked", async () => {
    const { id, key } = await createLisConnectionOverHttp(cookies.admin, { name: `Secrets LIS ${Date.now()}`, contactEmail: "lis@secrets.example" });
    secrets.set(key, "a new LIS key");
    const item = { items: [{ analyte: "GLU", value: 5.1, sex: "F", ageYears: 40 }] };
    expect((await fetchWithKey(key, "/api/v1/scores", { method: "POST", body: item })).status).toBe(200);

    const forged = `bwk_${randomBytes(32).toString("base64url")}`;
    secrets.set(forged, "a forged LIS key");
    const malformed = `bwk_${fresh("a malformed LIS key")}`;
    secrets.set(malformed, "a malformed LIS key");
    for (const bad of [forged, malformed]) {
      const res = await keepIfRefused(await fetchWithKey(bad, "/api/v1/scores", { method: "POST", body: item }));
      expect(res.status).toBe(401);
    }
    // A key on a route that takes none.
    expect((await keepIfRefused(await fetchWithKey(key, "/api/v1/studies"))).status).toBe(403);

    const revoked = await fetch(`${BASE_URL}/api/v1/lis-connections/${id}/revoke`, { method: "POST", headers: { cookie: cookies.admin } });
    expect(revoked.status).toBe(200);
    expect((await keepIfRefused(await fetchWithKey(key, "/api/v1/scores", { method: "POST", body: item }))).status).toBe(401);
  });

  it("signing a version: a wrong password, a body that is not JSON, then the right password", async () => {
    const code = uniqueCode("SEC");
    await createAnalyte(cookies, { code, name: `Secrets ${code}`, unit: "mmol/L", decimals: 2 });
    const partition = { low: 3.5, high: 5.1, method: "parametric" as const, n: 120, model: { kind: "gaussian", transform: "none", mean: 4.3, sd: 0.41 } };
    // A first version in force through the real routes, signed with the director's password.
    await putInForce(pool, cookies, code, [partition]);

    // A second one drafted as putInForce does, submitted, then signed: wrong first.
    const scientist = demoUser("scientist");
    const { rows } = await pool.query(
      `INSERT INTO interval_versions (analyte_id, number, unit, decimals, created_by, updated_by)
       SELECT a.id, 2, a.unit, a.decimals, u.id, u.id FROM analytes a, users u WHERE a.code = $1 AND u.email = $2 RETURNING id`,
      [code, scientist.email],
    );
    const versionId = rows[0].id as string;
    await pool.query(
      `INSERT INTO interval_partitions (version_id, position, low, high, method, n, model) VALUES ($1, 1, 3.6, 5.2, 'parametric', 120, $2)`,
      [versionId, JSON.stringify({ kind: "gaussian", transform: "none", mean: 4.4, sd: 0.41 })],
    );
    const post = (path: string, cookie: string, body?: string) =>
      fetch(`${BASE_URL}${path}`, { method: "POST", headers: { cookie, ...(body === undefined ? {} : { "content-type": "application/json" }) }, body });
    expect((await post(`/api/v1/interval-versions/${versionId}/submit`, cookies.scientist)).status).toBe(200);

    const director = demoUser("director");
    const wrong = fresh("a wrong signing password");
    const refused = await keepIfRefused(
      await post(`/api/v1/interval-versions/${versionId}/sign`, cookies.director, JSON.stringify({ meaning: "approved_for_clinical_use", password: wrong, email: director.email })),
    );
    expect(refused.status).toBe(403);
    const broken = fresh("a password in a body that is not JSON");
    const notJson = await keepIfRefused(await post(`/api/v1/interval-versions/${versionId}/sign`, cookies.director, `{"password": "${broken}", "meaning": `));
    expect(notJson.status).toBe(400);
    const wrongType = fresh("a password sent beside a wrong field");
    const invalid = await keepIfRefused(
      await post(`/api/v1/interval-versions/${versionId}/sign`, cookies.director, JSON.stringify({ meaning: "approved", password: wrongType, pasword: wrongType })),
    );
    expect(invalid.status).toBe(422);
    const signed = await post(`/api/v1/interval-versions/${versionId}/sign`, cookies.director, JSON.stringify({ meaning: "approved_for_clinical_use", password: director.password, email: director.email }));
    expect(signed.status).toBe(200);
  });
});

describe("where secrets must not be", () => {
  const expectAbsent = (where: string, text: string) => {
    const found = [...secrets].filter(([secret]) => secret.length >= 8 && text.includes(secret)).map(([, label]) => label);
    expect(found, `secrets found in ${where}`).toEqual([]);
  };

  it("the search finds a secret where one is meant to be (so that finding none below means something)", async () => {
    const { key } = await createLisConnectionOverHttp(cookies.admin, { name: `Secrets control ${Date.now()}`, contactEmail: "lis@secrets.example" });
    secrets.set(key, "the control key");
    // The one-time answer that carries the key, searched as the refusals are.
    const found = [...secrets].filter(([secret]) => `{"key":"${key}"}`.includes(secret)).map(([, label]) => label);
    expect(found).toEqual(["the control key"]);
    // The first 12 characters of every key are kept (lis_connections.key_prefix): the table search finds them.
    const { rows } = await pool.query(`SELECT count(*)::int AS n FROM lis_connections t WHERE t::text LIKE ANY($1)`, [[`%${key.slice(0, 12)}%`]]);
    expect(rows[0].n).toBe(1);
  });

  it("the flows handled at least the secrets they were meant to", () => {
    // Four demo passwords and their cookies, the demo key, and those made above.
    expect(secrets.size).toBeGreaterThan(25);
    expect(refusals.length).toBeGreaterThanOrEqual(10);
  });

  it("not in the served app's log", () => {
    const file = process.env.BELLWETHER_TEST_APP_LOG;
    if (!file) throw new Error("BELLWETHER_TEST_APP_LOG is not set: run the tests through `npm test`");
    const log = fs.readFileSync(file, "utf8");
    expect(log.length).toBeGreaterThan(0);
    expectAbsent("the app's log", log);
  });

  it("not in any refusal", () => {
    for (const text of refusals) expectAbsent(`the refusal ${text.slice(0, 200)}`, text);
  });

  it("not in the audit trail, nor in any other table", async () => {
    const { rows: events } = await pool.query<{ row: string }>("SELECT row_to_json(a)::text AS row FROM audit_events a");
    expect(events.length).toBeGreaterThan(0);
    expectAbsent("audit_events", events.map((e) => e.row).join("\n"));
    const { rows: tables } = await pool.query<{ table_name: string }>(
      "SELECT table_name FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' ORDER BY table_name",
    );
    const patterns = [...secrets.keys()].filter((s) => s.length >= 8).map((s) => `%${s.replace(/[\\%_]/g, (c) => `\\${c}`)}%`);
    const hits: string[] = [];
    for (const { table_name } of tables) {
      const { rows } = await pool.query(`SELECT count(*)::int AS n FROM "${table_name}" t WHERE t::text LIKE ANY($1)`, [patterns]);
      if (rows[0].n > 0) hits.push(`${table_name}: ${rows[0].n}`);
    }
    expect(hits).toEqual([]);
  });
});
