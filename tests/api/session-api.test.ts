import { afterAll, describe, expect, it } from "vitest";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { changeUserRole, createUser, setUserActive } from "@/db/queries/users";
import { testDatabase, uniqueEmail } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

describe("GET /api/v1/me through the real route handler", () => {
  it("answers an anonymous caller 401 with problem+json and a readable message", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/me`);
    expect(res.status).toBe(401);
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    expect(await res.json()).toEqual({
      type: "urn:bellwether:problem:unauthenticated",
      title: "Sign-in required",
      status: 401,
      detail: "Sign in to continue.",
      instance: "/api/v1/me",
    });
  });

  it("tells a signed-in clinician who they are and what they may do", async () => {
    const clinician = demoUser("clinician");
    const cookie = await signInOverHttp(clinician.email, clinician.password);
    const res = await fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie } });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ email: clinician.email, name: clinician.name, role: "clinician" });
    expect(body.permissions).toEqual(["intervals:read", "scores:create"]);
  });

  it("a role change ends the person's sessions at once; signing in again gives the new role", async () => {
    const email = uniqueEmail("fresh-role");
    const user = await createUser(database, { input: { email, name: "Fresh", role: "clinician", password: "p".repeat(14) }, actor: SYSTEM_ACTOR });
    const cookie = await signInOverHttp(email, "p".repeat(14));
    await changeUserRole(database, { id: user.id, role: "director", actor: SYSTEM_ACTOR });
    const stale = await fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie } });
    expect(stale.status).toBe(401);
    expect((await stale.json()).detail).toBe("Sign in to continue.");
    const fresh = await signInOverHttp(email, "p".repeat(14));
    const body = await (await fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie: fresh } })).json();
    expect(body.role).toBe("director");
  });

  it("stops a deactivated user's session on the next request", async () => {
    const email = uniqueEmail("deactivated");
    const user = await createUser(database, { input: { email, name: "Gone", role: "scientist", password: "q".repeat(14) }, actor: SYSTEM_ACTOR });
    const cookie = await signInOverHttp(email, "q".repeat(14));
    expect((await fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie } })).status).toBe(200);
    await setUserActive(database, { id: user.id, active: false, actor: SYSTEM_ACTOR });
    const res = await fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie } });
    expect(res.status).toBe(401);
    expect((await res.json()).detail).toBe("This account has been deactivated. Ask your administrator.");
  });
});

describe("security headers", () => {
  const required = {
    "x-content-type-options": "nosniff",
    "x-frame-options": "DENY",
    "referrer-policy": "same-origin",
  };

  for (const path of ["/sign-in", "/api/v1/me", "/api/health", "/"]) {
    it(`are on ${path}`, async () => {
      const res = await fetch(`${BASE_URL}${path}`, { redirect: "manual" });
      for (const [name, value] of Object.entries(required)) expect(res.headers.get(name)).toBe(value);
      const csp = res.headers.get("content-security-policy") ?? "";
      expect(csp).toContain("frame-ancestors 'none'");
    });
  }

  it("gives pages a script policy with a fresh nonce per request", async () => {
    const a = (await fetch(`${BASE_URL}/sign-in`)).headers.get("content-security-policy") ?? "";
    const b = (await fetch(`${BASE_URL}/sign-in`)).headers.get("content-security-policy") ?? "";
    const nonce = (csp: string) => /'nonce-([^']+)'/.exec(csp)?.[1];
    expect(nonce(a)).toBeTruthy();
    expect(nonce(a)).not.toBe(nonce(b));
    expect(a).toContain("object-src 'none'");
  });
});

describe("unknown API addresses", () => {
  it("answer 404 as problem+json, not an HTML page", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/no-such-thing`, { method: "POST" });
    expect(res.status).toBe(404);
    expect(res.headers.get("content-type")).toBe("application/problem+json");
    expect(await res.json()).toEqual({
      type: "urn:bellwether:problem:not_found",
      title: "Not found",
      status: 404,
      detail: "There is no API endpoint at /api/v1/no-such-thing.",
      instance: "/api/v1/no-such-thing",
    });
  });
});

describe("health", () => {
  it("answers ok when the database answers", async () => {
    const res = await fetch(`${BASE_URL}/api/health`);
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ status: "ok", database: "ok" });
  });
});
