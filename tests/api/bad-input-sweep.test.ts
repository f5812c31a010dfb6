/**
 * A net under the bad-input tables: every route handler under app/api/v1 (listed from the file
 * system, so a new route is swept too) and every method it exports, sent malformed bodies and
 * hostile query strings. Ids in the path are unknown UUIDs, so no request can reach a real row.
 * Whatever the route, the answer is a 4xx with a readable problem (an OperationOutcome on the
 * FHIR routes), never a 5xx, and no table changes. The exact status and message of each input
 * are in bad-input-api.test.ts and bad-input-uploads.test.ts.
 */
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoUser } from "../support/demo-users";
import { signInOverHttp } from "../support/http-session";
import { countEveryTable, ownerPool, sendRaw, type Sent } from "../support/bad-input";

const owner = ownerPool();
afterAll(() => owner.end());

const API_DIR = path.resolve(__dirname, "..", "..", "app", "api", "v1");
const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;

function routeFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return routeFiles(full);
    return entry.name === "route.ts" ? [full] : [];
  });
}

/** The methods a route module exports (`export const POST`, `export function GET`, `export { GET as PUT }`). */
function exportedMethods(source: string): string[] {
  const found = new Set<string>();
  for (const m of source.matchAll(/export\s+(?:const|let|async\s+function|function)\s+([A-Z]+)\b/g)) found.add(m[1]);
  for (const m of source.matchAll(/export\s*\{([^}]*)\}/g)) {
    for (const part of m[1].split(",")) found.add(part.trim().split(/\s+as\s+/).pop()!.trim());
  }
  return METHODS.filter((method) => found.has(method));
}

const UNKNOWN = "00000000-0000-4000-8000-00000000bad1";

/** A URL path for the route with every parameter an unknown id (an analyte code that no analyte has). */
function urlOf(file: string): string {
  const segments = path.relative(path.resolve(API_DIR, "..", ".."), path.dirname(file)).split(path.sep);
  return (
    "/" +
    segments
      .map((s) => (s === "[code]" ? "NOSUCH9" : s.startsWith("[...") ? "no-such-path" : /^\[.+\]$/.test(s) ? UNKNOWN : s))
      .join("/")
  );
}

const ROUTES = routeFiles(API_DIR).map((file) => ({ url: urlOf(file), methods: exportedMethods(readFileSync(file, "utf8")) }));

const deep = (n: number) => "[".repeat(n) + "]".repeat(n);
const JSON_TYPE = "application/json";
const BODIES: Record<string, { bytes: string | Uint8Array; type: string }> = {
  "null": { bytes: "null", type: JSON_TYPE },
  "an array": { bytes: "[]", type: JSON_TYPE },
  "a string": { bytes: '"text"', type: JSON_TYPE },
  "JSON cut off": { bytes: '{"a":', type: JSON_TYPE },
  "10,000 nested arrays": { bytes: deep(10_000), type: JSON_TYPE },
  "a NUL escape": { bytes: '{"name": "a\\u0000b", "title": "a\\u0000b"}', type: JSON_TYPE },
  "wrong types in every usual field": {
    bytes:
      '{"analyte": 1, "title": [], "name": {}, "value": "NaN", "values": "x", "password": 1e309, "partitions": "all", "items": {}, ' +
      '"ratePerMinute": -1e309, "comment": null, "reason": 5, "ids": [{}], "rule": ["horn"], "code": "<script>", "unit": "=1+1"}',
    type: JSON_TYPE,
  },
  "invalid UTF-8": { bytes: Buffer.from([0x7b, 0x22, 0xff, 0x22, 0x3a, 0x31, 0x7d]), type: JSON_TYPE },
  "JSON sent as text/plain": { bytes: '{"name": "x"}', type: "text/plain" },
};
const HOSTILE_QUERY = "?page=-1&pageSize=abc&sort=%27%3BDROP%20TABLE%20studies%3B--&sex=%3Cscript%3E&ageFrom=1e309&codes=%00&format=%00&analyte=%00";

let director: string;
let admin: string;
beforeAll(async () => {
  director = await signInOverHttp(demoUser("director").email, demoUser("director").password);
  admin = await signInOverHttp(demoUser("admin").email, demoUser("admin").password);
});

/** As the director, and as the admin where the director's role is refused, so that the route's own checks run. */
async function asAllowedRole(send: (cookie: string) => Promise<Sent>): Promise<Sent> {
  const first = await send(director);
  return first.status === 403 ? send(admin) : first;
}

function expectReadableRefusal(sent: Sent, what: string): void {
  expect(sent.status, what).toBeGreaterThanOrEqual(400);
  expect(sent.status, `${what}: ${JSON.stringify(sent.json)}`).toBeLessThan(500);
  if (sent.contentType === "application/fhir+json; charset=utf-8") {
    expect(sent.json?.resourceType, what).toBe("OperationOutcome");
  } else {
    expect(sent.contentType, what).toBe("application/problem+json");
    expect(typeof sent.json?.detail === "string" && sent.json.detail.length > 0, what).toBe(true);
  }
}

describe("every route refuses malformed input readably and changes nothing", () => {
  it("lists the routes from the file system", () => {
    expect(ROUTES.length).toBeGreaterThan(40);
  });

  for (const { url, methods } of ROUTES) {
    const writes = methods.filter((m) => m !== "GET");
    if (writes.length > 0) {
      it(`${writes.join(", ")} ${url}: malformed bodies`, async () => {
        const before = await countEveryTable(owner);
        for (const method of writes) {
          for (const [what, body] of Object.entries(BODIES)) {
            const sent = await asAllowedRole((cookie) => sendRaw(method, url, { cookie }, body));
            expectReadableRefusal(sent, `${method} ${url} with ${what}`);
          }
        }
        expect(await countEveryTable(owner)).toEqual(before);
      });
    }
    if (methods.includes("GET")) {
      it(`GET ${url}: a hostile query string`, async () => {
        const before = await countEveryTable(owner);
        const sent = await asAllowedRole((cookie) => sendRaw("GET", `${url}${HOSTILE_QUERY}`, { cookie }));
        // A listing whose query schema ignores unknown parameters may answer 200; never a 5xx.
        if (sent.status !== 200) expectReadableRefusal(sent, `GET ${url}${HOSTILE_QUERY}`);
        expect(await countEveryTable(owner)).toEqual(before);
      });
    }
  }
});
