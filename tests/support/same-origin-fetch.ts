/**
 * Setup file of the integration and browser suites (vitest.config.ts): requests that tests send
 * to the app under test with `fetch` carry `Origin: <the app's origin>` on POST, PUT, PATCH and
 * DELETE, as a browser on Bellwether's own pages would, so that the route handlers' cross-site
 * check (lib/api/origin.ts) lets them through. A test that sets `Origin` itself keeps its own;
 * one that must send no `Origin` at all uses `rawFetch`.
 */
import { BASE_URL } from "./http-session";

const APP_ORIGIN = new URL(BASE_URL).origin;
const STATE_CHANGING = new Set(["POST", "PUT", "PATCH", "DELETE"]);

/** The platform's fetch, sending exactly the headers it is given. */
export const rawFetch: typeof fetch = globalThis.fetch.bind(globalThis);

function sameOriginFetch(input: string | URL | Request, init?: RequestInit): Promise<Response> {
  const request = input instanceof Request ? input : null;
  const url = new URL(request ? request.url : input.toString());
  const method = (init?.method ?? request?.method ?? "GET").toUpperCase();
  if (url.origin !== APP_ORIGIN || !STATE_CHANGING.has(method)) return rawFetch(input, init);
  const headers = new Headers(init?.headers ?? request?.headers);
  if (headers.has("origin")) return rawFetch(input, init);
  headers.set("origin", APP_ORIGIN);
  return rawFetch(input, { ...init, headers });
}

globalThis.fetch = sameOriginFetch as typeof fetch;
