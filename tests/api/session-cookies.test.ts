import type { ChildProcess } from "node:child_process";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { serveApp, stopApp } from "@/scripts/lib/app-stack";
import { demoUser } from "../support/demo-users";
import { BASE_URL } from "../support/http-session";

/**
 * Session cookies (issue 12, "Security basics"): httpOnly, SameSite, and Secure when served over
 * HTTPS. The app under test is served at an http:// NEXTAUTH_URL; a second instance of the same
 * build, told that its public address is https:// (as behind a TLS-terminating proxy), is asked
 * over plain http here: the cookies it sets are what a browser would receive through the proxy.
 */
const HTTPS_PORT = Number(process.env.BELLWETHER_TEST_SPARE_PORT ?? 3110) + 2;
const HTTPS_DIRECT = `http://127.0.0.1:${HTTPS_PORT}`;
let httpsInstance: ChildProcess | null = null;

beforeAll(async () => {
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: "production",
    NEXTAUTH_URL: "https://bellwether.hospital.example",
    BELLWETHER_DEMO: "1",
    BELLWETHER_TRUSTED_PROXIES: "127.0.0.1",
    BELLWETHER_MAIL_INTERVAL_SECONDS: "3600",
  };
  delete env.BELLWETHER_MIGRATION_URL;
  const dataDir = process.env.BELLWETHER_TEST_DATA_DIR ?? ".test-data";
  httpsInstance = await serveApp({ port: HTTPS_PORT, env, quiet: true, logFile: path.join(dataDir, "app-https.log") });
}, 120_000);

afterAll(async () => {
  await stopApp(httpsInstance);
});

interface SetCookie {
  name: string;
  value: string;
  attributes: Record<string, string | true>;
}

function parseSetCookie(header: string): SetCookie {
  const [pair, ...rest] = header.split(";").map((p) => p.trim());
  const eq = pair.indexOf("=");
  const attributes: Record<string, string | true> = {};
  for (const part of rest) {
    const i = part.indexOf("=");
    attributes[(i < 0 ? part : part.slice(0, i)).toLowerCase()] = i < 0 ? true : part.slice(i + 1);
  }
  return { name: pair.slice(0, eq), value: pair.slice(eq + 1), attributes };
}

/** Signs in as the demo scientist through next-auth's endpoints; returns every cookie set on the way. */
async function signInCookies(base: string): Promise<SetCookie[]> {
  const csrfRes = await fetch(`${base}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const first = csrfRes.headers.getSetCookie().map(parseSetCookie);
  const jar = first.map((c) => `${c.name}=${c.value}`).join("; ");
  const user = demoUser("scientist");
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: jar },
    body: new URLSearchParams({ csrfToken, email: user.email, password: user.password, json: "true" }),
  });
  return [...first, ...res.headers.getSetCookie().map(parseSetCookie)];
}

describe("session cookies", () => {
  it("over http: httpOnly and SameSite=Lax, not Secure, under the plain names", async () => {
    const cookies = await signInCookies(BASE_URL);
    const names = cookies.map((c) => c.name);
    expect(names).toEqual(expect.arrayContaining(["next-auth.csrf-token", "next-auth.callback-url", "next-auth.session-token"]));
    for (const cookie of cookies) {
      expect({ name: cookie.name, httpOnly: cookie.attributes.httponly, sameSite: cookie.attributes.samesite, secure: cookie.attributes.secure }).toEqual({
        name: cookie.name,
        httpOnly: true,
        sameSite: "Lax",
        secure: undefined,
      });
    }
  });

  it("when NEXTAUTH_URL is https: httpOnly, SameSite=Lax and Secure, under the __Secure- and __Host- names", async () => {
    const cookies = await signInCookies(HTTPS_DIRECT);
    const names = cookies.map((c) => c.name);
    expect(names).toEqual(expect.arrayContaining(["__Host-next-auth.csrf-token", "__Secure-next-auth.callback-url", "__Secure-next-auth.session-token"]));
    for (const cookie of cookies) {
      expect({ name: cookie.name, httpOnly: cookie.attributes.httponly, sameSite: cookie.attributes.samesite, secure: cookie.attributes.secure }).toEqual({
        name: cookie.name,
        httpOnly: true,
        sameSite: "Lax",
        secure: true,
      });
    }
    // The pages read the session from the cookie of that name (proxy.ts and the server agree).
    const session = cookies.find((c) => c.name === "__Secure-next-auth.session-token") as SetCookie;
    const page = await fetch(`${HTTPS_DIRECT}/account`, { redirect: "manual", headers: { cookie: `${session.name}=${session.value}` } });
    expect(page.status).toBe(200);
    const me = await fetch(`${HTTPS_DIRECT}/api/v1/me`, { headers: { cookie: `${session.name}=${session.value}` } });
    expect(me.status).toBe(200);
    expect((await me.json()).email).toBe(demoUser("scientist").email);
    // The plain name means nothing there.
    const plain = await fetch(`${HTTPS_DIRECT}/account`, { redirect: "manual", headers: { cookie: `next-auth.session-token=${session.value}` } });
    expect(plain.status).toBe(307);
  });
});
