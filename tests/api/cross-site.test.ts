import fs from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { countEveryTable } from "../support/table-counts";
import { BASE_URL } from "../support/http-session";
import { demoLisKey } from "../support/lis";
import { rawFetch } from "../support/same-origin-fetch";
import { actionStateOf, postServerAction } from "../support/server-actions";
import { signInAll, type Cookies } from "../support/studies";

/**
 * The origin check (issue 12: "a cross-site form post is refused"). Route handlers refuse a
 * POST/PUT/PATCH/DELETE that the session cookie would authenticate when it comes from another
 * site; requests with an LIS key are not checked; server actions are checked by Next itself.
 * `rawFetch` sends exactly the headers given (the suite's fetch adds the app's Origin).
 */
const { pool } = testDatabase();
const APP_ORIGIN = new URL(BASE_URL).origin;
const EVIL = "https://evil.example";
const AFTERWORD =
  "Changes made with a signed-in session must come from Bellwether's own pages; a laboratory system sends its LIS key instead.";
const byOrigin = (origin: string) => `Bellwether refused this change because it came from another site (${origin}). ${AFTERWORD}`;
const byFetchSite = (site: string) =>
  `Bellwether refused this change because the browser marked it as coming from another site (Sec-Fetch-Site: ${site}). ${AFTERWORD}`;

let cookies: Cookies;
beforeAll(async () => {
  cookies = await signInAll();
});
afterAll(() => pool.end());

/** Tables that change without any request of the test: the score log flush (the rate limiter's and the audit chain's are left out by countEveryTable). */
const BACKGROUND = ["score_log"];
async function domainCounts(): Promise<Record<string, number>> {
  const all = await countEveryTable(pool);
  for (const t of BACKGROUND) delete all[t];
  return all;
}

const study = (title: string) => JSON.stringify({ analyte: "GLU", title, method: "Hexokinase", specimen: "plasma" });

function postStudy(headers: Record<string, string>, cookie: string | null = cookies.scientist): Promise<Response> {
  return rawFetch(`${BASE_URL}/api/v1/studies`, {
    method: "POST",
    headers: { "content-type": "application/json", ...(cookie ? { cookie } : {}), ...headers },
    body: study(`Cross-site ${JSON.stringify(headers)}`),
  });
}

async function expectRefused(res: Response, detail: string) {
  expect(res.headers.get("content-type")).toBe("application/problem+json");
  const body = await res.json();
  expect({ status: res.status, type: body.type, detail: body.detail }).toEqual({ status: 403, type: "urn:bellwether:problem:forbidden", detail });
}

describe("route handlers and the session cookie", () => {
  const refused: [string, Record<string, string>, string][] = [
    ["an Origin of another site", { origin: EVIL }, byOrigin(EVIL)],
    ["Origin: null", { origin: "null" }, byOrigin("null")],
    ["the app's host on another port", { origin: "http://127.0.0.1:1" }, byOrigin("http://127.0.0.1:1")],
    ["no Origin and Sec-Fetch-Site: cross-site", { "sec-fetch-site": "cross-site" }, byFetchSite("cross-site")],
    ["no Origin and Sec-Fetch-Site: same-site", { "sec-fetch-site": "same-site" }, byFetchSite("same-site")],
  ];
  for (const [what, headers, detail] of refused) {
    it(`refuses a POST with ${what} (403) and changes nothing`, async () => {
      const before = await domainCounts();
      await expectRefused(await postStudy(headers), detail);
      expect(await domainCounts()).toEqual(before);
    });
  }

  const allowed: [string, Record<string, string>][] = [
    ["the app's own Origin", { origin: APP_ORIGIN }],
    ["no Origin and Sec-Fetch-Site: same-origin", { "sec-fetch-site": "same-origin" }],
    ["neither header (a script)", {}],
  ];
  for (const [what, headers] of allowed) {
    it(`accepts a POST with ${what}`, async () => {
      const before = await domainCounts();
      const res = await postStudy(headers);
      expect(res.status).toBe(201);
      const after = await domainCounts();
      expect(after).toEqual({ ...before, studies: before.studies + 1, audit_events: before.audit_events + 1 });
    });
  }

  it("refuses PATCH, PUT and DELETE from another site before looking at the target", async () => {
    const before = await domainCounts();
    const requests: [string, string, unknown][] = [
      ["PATCH", "/api/v1/analytes/GLU", { name: "Changed from another site" }],
      ["PUT", "/api/v1/studies/00000000-0000-4000-8000-000000000000/partition-plan", { partitions: [] }],
      ["DELETE", "/api/v1/studies/00000000-0000-4000-8000-000000000000/exclusions/00000000-0000-4000-8000-000000000000", undefined],
    ];
    for (const [method, path, body] of requests) {
      const res = await rawFetch(`${BASE_URL}${path}`, {
        method,
        headers: { cookie: cookies.scientist, origin: EVIL, ...(body === undefined ? {} : { "content-type": "application/json" }) },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      await expectRefused(res, byOrigin(EVIL));
    }
    expect(await domainCounts()).toEqual(before);
  });

  it("refuses an anonymous cross-site POST with the same 403", async () => {
    await expectRefused(await postStudy({ origin: EVIL }, null), byOrigin(EVIL));
  });

  it("answers the FHIR route's refusal as an OperationOutcome", async () => {
    const res = await rawFetch(`${BASE_URL}/api/v1/fhir/Observation/$score`, {
      method: "POST",
      headers: { cookie: cookies.clinician, origin: EVIL, "content-type": "application/fhir+json" },
      body: JSON.stringify({ resourceType: "Observation", status: "final" }),
    });
    expect(res.status).toBe(403);
    const body = await res.json();
    expect(body.resourceType).toBe("OperationOutcome");
    expect(JSON.stringify(body)).toContain(byOrigin(EVIL));
  });

  it("lets GET through from anywhere: reading changes nothing", async () => {
    const res = await rawFetch(`${BASE_URL}/api/v1/analytes/GLU`, { headers: { cookie: cookies.clinician, origin: EVIL, "sec-fetch-site": "cross-site" } });
    expect(res.status).toBe(200);
  });

  it("does not check requests with an LIS key, with or without a cookie beside it", async () => {
    for (const cookie of [undefined, cookies.clinician]) {
      const res = await rawFetch(`${BASE_URL}/api/v1/scores`, {
        method: "POST",
        headers: {
          authorization: `Bearer ${demoLisKey()}`,
          "content-type": "application/json",
          origin: EVIL,
          "sec-fetch-site": "cross-site",
          ...(cookie ? { cookie } : {}),
        },
        body: JSON.stringify({ items: [{ analyte: "GLU", value: 5.1, sex: "F", ageYears: 40 }] }),
      });
      expect(res.status).toBe(200);
    }
  });
});

describe("server actions", () => {
  const analyteCount = async (code: string) => (await pool.query("SELECT count(*)::int AS n FROM analytes WHERE code = $1", [code])).rows[0].n;
  const call = (code: string, headers: Record<string, string>) =>
    postServerAction(
      {
        file: "app/(lab)/analytes/actions.ts",
        name: "createAnalyteAction",
        page: "/analytes",
        cookie: cookies.scientist,
        headers,
        fields: { code, name: `Cross-site ${code}`, unit: "mmol/L", decimals: "2", specimen: "serum" },
      },
      rawFetch,
    );

  it("run from Bellwether's own origin (the request the refusals below differ from only in their headers)", async () => {
    const res = await call("XSOK", { origin: APP_ORIGIN, "sec-fetch-site": "same-origin" });
    expect(res.status).toBe(200);
    expect(actionStateOf(await res.text())).toEqual({ status: "ok", message: "Added XSOK (Cross-site XSOK, mmol/L) to the catalogue." });
    expect(await analyteCount("XSOK")).toBe(1);
  });

  it("are refused by Next's own check when Origin names another site, changing nothing", async () => {
    const before = await domainCounts();
    const res = await call("XSEVIL", { origin: EVIL, "sec-fetch-site": "cross-site" });
    const text = await res.text();
    expect(res.status).toBe(500);
    expect(actionStateOf(text)).toBeNull();
    expect(await analyteCount("XSEVIL")).toBe(0);
    expect(await domainCounts()).toEqual(before);
    // Next's message, in the served app's log (scripts/run-tests.ts writes it to a file).
    const log = fs.readFileSync(process.env.BELLWETHER_TEST_APP_LOG as string, "utf8");
    expect(log).toContain(`header with value \`${new URL(BASE_URL).host}\` does not match`);
    expect(log).toContain("does not match `origin` header with value `evil.example` from a forwarded Server Actions request. Aborting the action.");
  });

  it("are refused (403) when they carry no Origin but the browser marks them cross-site", async () => {
    const before = await domainCounts();
    const res = await call("XSFETCH", { "sec-fetch-site": "cross-site" });
    await expectRefused(res, byFetchSite("cross-site"));
    expect(await analyteCount("XSFETCH")).toBe(0);
    expect(await domainCounts()).toEqual(before);
  });
});
