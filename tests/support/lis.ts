import { BASE_URL } from "./http-session";

/** The demo LIS connection's key that scripts/run-tests.ts gave the seed and the app. */
export function demoLisKey(): string {
  const key = process.env.BELLWETHER_DEMO_LIS_KEY;
  if (!key) throw new Error("BELLWETHER_DEMO_LIS_KEY is not set: run the tests through `npm test`");
  return key;
}

/** A request to the app under test with `Authorization: Bearer <key>`. */
export function fetchWithKey(key: string, path: string, init: { method?: string; body?: unknown; headers?: Record<string, string> } = {}): Promise<Response> {
  const headers: Record<string, string> = { authorization: `Bearer ${key}`, ...init.headers };
  if (init.body !== undefined) headers["content-type"] ??= "application/json";
  return fetch(`${BASE_URL}${path}`, {
    method: init.method ?? "GET",
    headers,
    body: init.body === undefined ? undefined : JSON.stringify(init.body),
  });
}

/** Creates an LIS connection as an administrator (cookie) and returns its id and key. */
export async function createLisConnectionOverHttp(
  adminCookie: string,
  body: { name: string; contactEmail: string; ratePerMinute?: number },
): Promise<{ id: string; key: string }> {
  const res = await fetch(`${BASE_URL}/api/v1/lis-connections`, {
    method: "POST",
    headers: { cookie: adminCookie, "content-type": "application/json" },
    body: JSON.stringify(body),
  });
  if (res.status !== 201) throw new Error(`creating an LIS connection answered ${res.status}: ${await res.text()}`);
  const created = (await res.json()) as { id: string; key: string };
  return { id: created.id, key: created.key };
}
