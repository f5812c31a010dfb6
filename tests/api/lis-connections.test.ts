import { createHash, randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import type { Role } from "@/db/schema";
import { createdLisConnectionSchema, lisConnectionListSchema, lisUsageSchema } from "@/lib/lis/input";
import { testDatabase, uniqueEmail } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";
import { createLisConnectionOverHttp, demoLisKey, fetchWithKey } from "../support/lis";

const { pool } = testDatabase();
afterAll(() => pool.end());

/** DESIGN.md's roles table written out: only admins manage LIS connections. */
const MAY_MANAGE: Record<Role, boolean> = { admin: true, director: false, scientist: false, clinician: false };
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

async function counts(): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of ["lis_connections", "audit_events"]) out[t] = (await pool.query(`SELECT count(*)::int AS n FROM ${t}`)).rows[0].n;
  return out;
}

// Written out rather than imported: the contract is "bwk_" and 43 base64url characters.
const KEY_FORM = /^bwk_[A-Za-z0-9_-]{43}$/;
const sha256 = (text: string) => createHash("sha256").update(text).digest("hex");
const forgedKey = () => `bwk_${randomBytes(32).toString("base64url")}`;

const newConnection = (tag: string, extra: Record<string, unknown> = {}) => ({ name: `Ward LIS ${tag} ${Date.now()}`, contactEmail: uniqueEmail(`lis-${tag}`), ...extra });

describe("POST /api/v1/lis-connections", () => {
  for (const role of ROLES) {
    it(`${MAY_MANAGE[role] ? "lets" : "refuses"} the ${role} ${MAY_MANAGE[role] ? "create" : "creating"} a connection`, async () => {
      const before = await counts();
      const body = newConnection(role, { ratePerMinute: 1200 });
      const res = await send("POST", "/api/v1/lis-connections", role, body);
      if (!MAY_MANAGE[role]) {
        expect(res.status).toBe(403);
        expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
        expect(await counts()).toEqual(before);
        return;
      }
      expect(res.status).toBe(201);
      const created = await res.json();
      expect(created).toEqual({
        id: expect.any(String),
        name: body.name,
        contactEmail: body.contactEmail,
        keyPrefix: created.key.slice(0, 12),
        ratePerMinute: 1200,
        status: "active",
        createdAt: expect.stringMatching(/Z$/),
        createdBy: { id: expect.any(String), name: demoUser("admin").name },
        updatedAt: expect.stringMatching(/Z$/),
        revokedAt: null,
        revokedBy: null,
        lastUsedAt: null,
        key: expect.stringMatching(KEY_FORM),
      });
      expect(res.headers.get("location")).toBe(`/api/v1/lis-connections/${created.id}`);
      // The schemas the API document is built from describe what is answered.
      expect(createdLisConnectionSchema.safeParse(created).error).toBeUndefined();
      expect(await counts()).toEqual({ lis_connections: before.lis_connections + 1, audit_events: before.audit_events + 1 });
      // Stored as its SHA-256 and prefix only; the key itself is nowhere in the database.
      const [row] = (await pool.query("SELECT key_sha256, key_prefix FROM lis_connections WHERE id = $1", [created.id])).rows;
      expect(row).toEqual({ key_sha256: sha256(created.key), key_prefix: created.key.slice(0, 12) });
      const [event] = (await pool.query("SELECT actor_label, action, summary, details::text AS details FROM audit_events WHERE entity_id = $1", [created.id])).rows;
      expect(event).toMatchObject({ actor_label: demoUser("admin").email, action: "lis_connection.created" });
      expect(`${event.summary}${event.details}`).not.toContain(created.key);
      // Later answers never carry the key again.
      const again = await send("GET", `/api/v1/lis-connections/${created.id}`, "admin");
      expect(again.status).toBe(200);
      const text = await again.text();
      expect(text).not.toContain(created.key);
      expect(JSON.parse(text)).not.toHaveProperty("key");
      const list = await (await send("GET", "/api/v1/lis-connections", "admin")).text();
      expect(lisConnectionListSchema.safeParse(JSON.parse(list)).error).toBeUndefined();
      expect(list).toContain(created.id);
      expect(list).not.toContain(created.key);
    });
  }

  it("uses the default rate of 6,000 a minute when none is given (the issue's default)", async () => {
    const res = await send("POST", "/api/v1/lis-connections", "admin", newConnection("default"));
    expect(res.status).toBe(201);
    expect((await res.json()).ratePerMinute).toBe(6000);
  });

  const invalid: [string, Record<string, unknown>, string][] = [
    ["an empty name", { name: "  " }, "name: Give the connection a name."],
    ["an address that is not one", { contactEmail: "lis team" }, "contactEmail: Give a contact e-mail address such as lis-team@hospital.example."],
    ["a rate of 0", { ratePerMinute: 0 }, "ratePerMinute: The rate limit is at least 1 request a minute."],
    ["a fractional rate", { ratePerMinute: 2.5 }, "ratePerMinute: The rate limit is a whole number of requests a minute."],
    ["a rate beyond 10,000,000", { ratePerMinute: 10_000_001 }, "ratePerMinute: The rate limit is at most 10,000,000 requests a minute."],
    ["a key sent by the client", { key: forgedKey() }, 'Unrecognized key: "key"'],
  ];
  for (const [what, change, message] of invalid) {
    it(`answers 422 for ${what} and changes nothing`, async () => {
      const before = await counts();
      const res = await send("POST", "/api/v1/lis-connections", "admin", { ...newConnection("bad"), ...change });
      expect(res.status).toBe(422);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect((await res.json()).detail).toContain(message);
      expect(await counts()).toEqual(before);
    });
  }

  it("answers an anonymous caller 401", async () => {
    const res = await send("POST", "/api/v1/lis-connections", null, newConnection("anonymous"));
    expect(res.status).toBe(401);
  });
});

describe("GET, PATCH /api/v1/lis-connections/{id} and POST …/revoke", () => {
  let id: string;
  let key: string;
  beforeAll(async () => {
    ({ id, key } = await createLisConnectionOverHttp(cookies.admin, newConnection("manage")));
  });

  for (const role of ROLES.filter((r) => !MAY_MANAGE[r])) {
    it(`refuses the ${role} reading, changing or revoking it`, async () => {
      const before = await counts();
      for (const [method, path, body] of [
        ["GET", `/api/v1/lis-connections/${id}`],
        ["GET", "/api/v1/lis-connections"],
        ["GET", "/api/v1/lis-connections/usage"],
        ["PATCH", `/api/v1/lis-connections/${id}`, { ratePerMinute: 5 }],
        ["POST", `/api/v1/lis-connections/${id}/revoke`],
      ] as const) {
        const res = await send(method, path, role, body);
        expect({ method, path, status: res.status }).toEqual({ method, path, status: 403 });
      }
      expect(await counts()).toEqual(before);
    });
  }

  it("changes the rate limit, the name and the address, audited field by field", async () => {
    const before = await counts();
    const res = await send("PATCH", `/api/v1/lis-connections/${id}`, "admin", { ratePerMinute: 250, contactEmail: "  New-Team@Lab.example " });
    expect(res.status).toBe(200);
    expect(await res.json()).toMatchObject({ id, ratePerMinute: 250, contactEmail: "new-team@lab.example", status: "active" });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    const [event] = (await pool.query("SELECT action, details FROM audit_events WHERE entity_id = $1 AND action = 'lis_connection.updated'", [id])).rows;
    expect(event.details).toMatchObject({ ratePerMinute: { from: 6000, to: 250 }, contactEmail: { to: "new-team@lab.example" } });
    // The same values again change nothing and write nothing.
    const same = await send("PATCH", `/api/v1/lis-connections/${id}`, "admin", { ratePerMinute: 250 });
    expect(same.status).toBe(200);
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
  });

  it("answers 422 for an empty change or a malformed id, and 404 for an unknown id", async () => {
    const before = await counts();
    const empty = await send("PATCH", `/api/v1/lis-connections/${id}`, "admin", {});
    expect(empty.status).toBe(422);
    expect((await empty.json()).detail).toBe("(root): Name at least one of name, contactEmail and ratePerMinute.");
    const malformed = await send("GET", "/api/v1/lis-connections/not-a-uuid", "admin");
    expect(malformed.status).toBe(422);
    expect((await malformed.json()).detail).toBe("id: The LIS connection id must be a UUID.");
    for (const [method, path] of [
      ["GET", "/api/v1/lis-connections/00000000-0000-4000-8000-000000000000"],
      ["PATCH", "/api/v1/lis-connections/00000000-0000-4000-8000-000000000000"],
      ["POST", "/api/v1/lis-connections/00000000-0000-4000-8000-000000000000/revoke"],
    ] as const) {
      const res = await send(method, path, "admin", method === "PATCH" ? { name: "x" } : undefined);
      expect(res.status).toBe(404);
      expect((await res.json()).detail).toBe("There is no LIS connection with this id.");
    }
    expect(await counts()).toEqual(before);
  });

  it("revokes the key for good: 401 from then on, a second revoke and any change 409", async () => {
    expect((await fetchWithKey(key, "/api/v1/analytes")).status).toBe(200);
    const before = await counts();
    const res = await send("POST", `/api/v1/lis-connections/${id}/revoke`, "admin");
    expect(res.status).toBe(200);
    const revoked = await res.json();
    expect(revoked).toMatchObject({ id, status: "revoked", revokedAt: expect.stringMatching(/Z$/), revokedBy: { name: demoUser("admin").name } });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });

    const refused = await fetchWithKey(key, "/api/v1/analytes");
    expect(refused.status).toBe(401);
    expect(refused.headers.get("www-authenticate")).toBe('Bearer realm="bellwether"');
    expect((await refused.json()).detail).toBe("This API key has been revoked. Ask your Bellwether administrator for a new one.");

    const day = revoked.revokedAt.slice(0, 10);
    const twice = await send("POST", `/api/v1/lis-connections/${id}/revoke`, "admin");
    expect(twice.status).toBe(409);
    expect((await twice.json()).detail).toBe(`The LIS connection "${revoked.name}" was already revoked on ${day}.`);
    const change = await send("PATCH", `/api/v1/lis-connections/${id}`, "admin", { ratePerMinute: 10 });
    expect(change.status).toBe(409);
    expect((await change.json()).detail).toBe(
      `The LIS connection "${revoked.name}" was revoked on ${day} and can no longer be changed; create a new connection instead.`,
    );
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
  });
});

describe("calling with an LIS key", () => {
  const UNKNOWN = "The API key was not recognised. Send the whole key as `Authorization: Bearer bwk_…`, or ask your Bellwether administrator for a new one.";

  it("reads the analyte catalogue with the demo connection's key", async () => {
    const res = await fetchWithKey(demoLisKey(), "/api/v1/analytes");
    expect(res.status).toBe(200);
    const codes = (await res.json()).analytes.map((a: { code: string }) => a.code);
    expect(codes).toContain("GLU");
    const one = await fetchWithKey(demoLisKey(), "/api/v1/analytes/GLU");
    expect(one.status).toBe(200);
  });

  for (const [what, header] of [
    ["a forged key of the right form", () => `Bearer ${forgedKey()}`],
    ["a malformed key", () => "Bearer bwk_not-a-key"],
    ["an empty Bearer header", () => "Bearer "],
    ["the demo key with one character changed", () => `Bearer ${demoLisKey().slice(0, -1)}${demoLisKey().endsWith("A") ? "B" : "A"}`],
  ] as const) {
    it(`answers ${what} 401, without echoing the key`, async () => {
      const sent = header();
      const res = await fetch(`${BASE_URL}/api/v1/analytes`, { headers: { authorization: sent } });
      expect(res.status).toBe(401);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect(res.headers.get("www-authenticate")).toBe('Bearer realm="bellwether"');
      const text = await res.text();
      expect(JSON.parse(text).detail).toBe(UNKNOWN);
      if (sent.length > 12) expect(text).not.toContain(sent.slice(7));
    });
  }

  it("is refused with 403 and a reason on routes that do not take keys, changing nothing", async () => {
    const reason =
      "An LIS key may only score values and read the analyte catalogue and the intervals in force; this endpoint needs a person signed in to Bellwether.";
    const before = await counts();
    for (const [method, path, body] of [
      ["GET", "/api/v1/studies"],
      ["GET", "/api/v1/me"],
      ["GET", "/api/v1/lis-connections"],
      ["POST", "/api/v1/lis-connections", newConnection("by-key")],
      ["POST", "/api/v1/analytes", { code: "XKEY", name: "By key", unit: "mmol/L", decimals: 1, specimen: "serum" }],
    ] as const) {
      const res = await fetchWithKey(demoLisKey(), path, { method, body });
      expect({ method, path, status: res.status }).toEqual({ method, path, status: 403 });
      expect((await res.json()).detail).toBe(reason);
    }
    expect(await counts()).toEqual(before);
  });

  it("prefers the key to a session cookie sent with it", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/studies`, { headers: { authorization: `Bearer ${demoLisKey()}`, cookie: cookies.scientist } });
    expect(res.status).toBe(403);
  });

  it("records when the key was last used, in the background", async () => {
    const { id, key } = await createLisConnectionOverHttp(cookies.admin, newConnection("last-used"));
    expect((await fetchWithKey(key, "/api/v1/analytes")).status).toBe(200);
    await vi.waitFor(
      async () => {
        const [row] = (await pool.query("SELECT last_used_at FROM lis_connections WHERE id = $1", [id])).rows;
        expect(row.last_used_at).toBeInstanceOf(Date);
      },
      { timeout: 20_000, interval: 250 },
    );
    const listed = await (await send("GET", `/api/v1/lis-connections/${id}`, "admin")).json();
    expect(listed.lastUsedAt).toMatch(/Z$/);
  });

  it("answers 429 with Retry-After once a low-limit connection has used its requests", async () => {
    const { key } = await createLisConnectionOverHttp(cookies.admin, newConnection("low-limit", { ratePerMinute: 3 }));
    const statuses: number[] = [];
    let refusal: Response | null = null;
    for (let i = 0; i < 8; i++) {
      const res = await fetchWithKey(key, "/api/v1/analytes");
      statuses.push(res.status);
      if (res.status === 429 && !refusal) refusal = res;
      else await res.body?.cancel();
    }
    expect(statuses[0]).toBe(200);
    expect(statuses.filter((s) => s === 200).length).toBeLessThanOrEqual(3);
    expect(statuses.every((s) => s === 200 || s === 429)).toBe(true);
    expect(refusal).not.toBeNull();
    expect(refusal!.headers.get("content-type")).toBe("application/problem+json");
    const retryAfter = Number(refusal!.headers.get("retry-after"));
    expect(Number.isInteger(retryAfter) && retryAfter >= 1 && retryAfter <= 60).toBe(true);
    const problem = await refusal!.json();
    expect(problem).toMatchObject({ status: 429, title: "Too many requests", retryAfter });
    expect(problem.detail).toMatch(/^The LIS connection "Ward LIS low-limit \d+" may make 3 requests a minute and has used them; try again in \d+ seconds?\./);
  });
});

describe("GET /api/v1/lis-connections/usage", () => {
  it("counts each connection's logged scores over 24 hours and 7 days, by flag and analyte", async () => {
    const { id } = await createLisConnectionOverHttp(cookies.admin, newConnection("usage"));
    const ids = Object.fromEntries((await pool.query("SELECT code, id FROM analytes WHERE code IN ('GLU', 'K')")).rows.map((r) => [r.code, r.id]));
    const log = (code: string, flag: string, hoursAgo: number, callerKind = "lis", callerId = id) =>
      pool.query(
        `INSERT INTO score_log (scored_at, analyte_id, version_id, partition_id, value, flag, caller_kind, caller_id, channel)
         VALUES (now() - make_interval(hours => $1), $2, gen_random_uuid(), gen_random_uuid(), 1, $3, $4, $5, 'api')`,
        [hoursAgo, ids[code], flag, callerKind, callerId],
      );
    await log("GLU", "N", 1);
    await log("GLU", "H", 23);
    await log("GLU", "LL", 30);
    await log("K", "L", 2);
    await log("K", "N", 24 * 6);
    // Left out: older than 7 days, and a person's score with the same id.
    await log("K", "H", 24 * 8);
    await log("GLU", "H", 1, "user");
    const before = await counts();
    const res = await send("GET", "/api/v1/lis-connections/usage", "admin");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(lisUsageSchema.safeParse(body).error).toBeUndefined();
    const mine = body.connections.find((c: { id: string }) => c.id === id);
    const c = (total: number, f: Partial<Record<"L" | "N" | "H" | "LL" | "HH", number>>) => ({ total, L: 0, N: 0, H: 0, LL: 0, HH: 0, ...f });
    expect(mine).toEqual({
      id,
      name: expect.stringContaining("Ward LIS usage"),
      keyPrefix: expect.stringMatching(/^bwk_/),
      status: "active",
      last24h: c(3, { N: 1, H: 1, L: 1 }),
      last7d: c(5, { N: 2, H: 1, L: 1, LL: 1 }),
      analytes: [
        { code: "GLU", name: "Glucose", last24h: c(2, { N: 1, H: 1 }), last7d: c(3, { N: 1, H: 1, LL: 1 }) },
        { code: "K", name: "Potassium", last24h: c(1, { L: 1 }), last7d: c(2, { L: 1, N: 1 }) },
      ],
    });
    expect(await counts()).toEqual(before);
  });
});
