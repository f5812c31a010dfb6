import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { BASE_URL } from "../support/http-session";
import { signInAll, type Cookies } from "../support/studies";

/**
 * Issue 12: "the content security policy has no `unsafe-eval` in production". The app under test
 * is the production build (scripts/run-tests.ts serves `next build`'s output with NODE_ENV
 * production). Every page answers a policy with a fresh nonce, which every inline script carries;
 * tests/e2e/content-security-policy.test.ts checks in Chromium that the pages run under it.
 */
const { pool } = testDatabase();
let cookies: Cookies;
let studyId: string;
let versionId: string;
beforeAll(async () => {
  cookies = await signInAll();
  studyId = (await pool.query("SELECT id FROM studies ORDER BY created_at LIMIT 1")).rows[0].id;
  versionId = (await pool.query("SELECT id FROM interval_versions WHERE state = 'in_force' ORDER BY created_at LIMIT 1")).rows[0].id;
});
afterAll(() => pool.end());

function directives(policy: string): Record<string, string[]> {
  return Object.fromEntries(
    policy
      .split(";")
      .map((d) => d.trim().split(/\s+/))
      .filter((parts) => parts[0])
      .map(([name, ...values]) => [name, values]),
  );
}

const PAGES: [string, keyof Cookies | null][] = [
  ["/sign-in", null],
  ["/", "director"],
  ["/studies", "scientist"],
  ["/analytes", "scientist"],
  ["/signoff", "director"],
  ["/intervals", "clinician"],
  ["/score", "clinician"],
  ["/api-docs", "clinician"],
  ["/account", "clinician"],
  ["/admin/users", "admin"],
  ["/admin/lis-connections", "admin"],
  ["/audit", "admin"],
];

describe("content security policy of the production build", () => {
  const pages = (): [string, keyof Cookies | null][] => [...PAGES, [`/studies/${studyId}`, "scientist"], [`/versions/${versionId}`, "director"]];

  it("every page: a nonce, 'strict-dynamic', no 'unsafe-eval' and no 'unsafe-inline' for scripts", async () => {
    const nonces = new Set<string>();
    for (const [path, role] of pages()) {
      const res = await fetch(`${BASE_URL}${path}`, { redirect: "manual", headers: role ? { cookie: cookies[role] } : {} });
      expect({ path, status: res.status }).toEqual({ path, status: 200 });
      const policy = res.headers.get("content-security-policy") ?? "";
      expect(policy, path).not.toContain("unsafe-eval");
      const d = directives(policy);
      const nonce = d["script-src"].find((v) => v.startsWith("'nonce-"));
      expect({ path, scriptSrc: d["script-src"] }).toEqual({ path, scriptSrc: ["'self'", nonce, "'strict-dynamic'"] });
      expect({ path, objectSrc: d["object-src"], frameAncestors: d["frame-ancestors"], baseUri: d["base-uri"], formAction: d["form-action"] }).toEqual({
        path,
        objectSrc: ["'none'"],
        frameAncestors: ["'none'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
      });
      nonces.add(nonce as string);
      // Every script element of the page carries this request's nonce.
      const html = await res.text();
      const value = (nonce as string).slice("'nonce-".length, -1);
      const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
      expect(scripts.length, path).toBeGreaterThan(0);
      for (const tag of scripts) expect(tag, path).toContain(`nonce="${value}"`);
    }
    // A fresh nonce per response.
    expect(nonces.size).toBe(pages().length);
  });

  it("the API and the static files: nothing may run", async () => {
    const api = await fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie: cookies.clinician } });
    expect(api.headers.get("content-security-policy")).toBe("default-src 'none'; frame-ancestors 'none'");
    const page = await (await fetch(`${BASE_URL}/sign-in`)).text();
    const asset = /\/_next\/static\/[^"]+\.js/.exec(page)?.[0] as string;
    const res = await fetch(`${BASE_URL}${asset}`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-security-policy")).toBe("default-src 'none'; style-src 'self'; font-src 'self'; frame-ancestors 'none'");
  });
});
