/**
 * POST /api/v1/fhir/Observation/$score through the served app on the real database: every failure
 * an OperationOutcome in application/fhir+json with the right HTTP status (never problem+json),
 * a Bundle answered as a batch-response, and the scored Observation's shapes against
 * METHODS.md §10.3's element rules.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { changePassword, createUser, findUserByEmail } from "@/db/queries/users";
import { testDatabase, uniqueEmail } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

const PATH = "/api/v1/fhir/Observation/$score";
const FHIR_JSON = "application/fhir+json; charset=utf-8";
const UCUM = "http://unitsofmeasure.org";

/** DESIGN.md's roles table written out: every signed-in role may score. */
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];
const cookies = {} as Record<Role, string>;
beforeAll(async () => {
  for (const role of ROLES) cookies[role] = await signInOverHttp(demoUser(role).email, demoUser(role).password);
});

function post(body: string | undefined, { cookie, type = "application/fhir+json", path = PATH }: { cookie?: string; type?: string | null; path?: string } = {}) {
  const headers: Record<string, string> = {};
  if (cookie) headers.cookie = cookie;
  if (type) headers["content-type"] = type;
  return fetch(`${BASE_URL}${path}`, { method: "POST", headers, body });
}

/** A potassium result of a 54-year-old woman, as an LIS would send it. */
function potassium(value = 4.2, extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    resourceType: "Observation",
    id: "k-1",
    status: "final",
    contained: [{ resourceType: "Patient", id: "pat", gender: "female", birthDate: "1971-06-14" }],
    code: { coding: [{ system: "http://loinc.org", code: "2823-3", display: "Potassium [Moles/volume] in Serum or Plasma" }] },
    subject: { reference: "#pat" },
    effectiveDateTime: "2026-03-02T08:15:00Z",
    valueQuantity: { value, unit: "mmol/L", system: UCUM, code: "mmol/L" },
    ...extra,
  };
}

async function scoreLogCount(): Promise<number> {
  const [{ n }] = (await pool.query("SELECT count(*)::int AS n FROM score_log")).rows;
  return n;
}

/** The answer is an OperationOutcome with one error issue of this type and text. */
async function expectOutcome(res: Response, status: number, code: string, diagnostics: string) {
  expect(res.status).toBe(status);
  expect(res.headers.get("content-type")).toBe(FHIR_JSON);
  expect(await res.json()).toEqual({
    resourceType: "OperationOutcome",
    issue: [{ severity: status >= 500 ? "fatal" : "error", code, diagnostics }],
  });
}

describe("refusals are OperationOutcomes", () => {
  let before = 0;
  beforeAll(async () => {
    before = await scoreLogCount();
  });

  it("answers an anonymous caller 401 with the login issue and WWW-Authenticate", async () => {
    const res = await post(JSON.stringify(potassium()));
    expect(res.headers.get("www-authenticate")).toBe('Bearer realm="bellwether"');
    await expectOutcome(res, 401, "login", "Sign in to continue.");
  });

  it("answers 403 (forbidden) to a person who must first replace an administrator's password", async () => {
    const email = uniqueEmail("fhir-403");
    const user = await createUser(database, { input: { email, name: "FHIR refused", role: "clinician", password: "first-password-of-mine" }, actor: SYSTEM_ACTOR });
    const admin = await findUserByEmail(database, { email: demoUser("admin").email });
    await changePassword(database, { id: user.id, password: "given-by-the-admin", actor: { id: admin!.id, label: admin!.email } });
    const cookie = await signInOverHttp(email, "given-by-the-admin");
    await expectOutcome(
      await post(JSON.stringify(potassium()), { cookie }),
      403,
      "forbidden",
      "An administrator set your password: choose your own before doing anything else. Sign in to Bellwether in a browser to change it.",
    );
  });

  it("answers another content type 415", async () => {
    await expectOutcome(
      await post(JSON.stringify(potassium()), { cookie: cookies.clinician, type: "text/plain" }),
      415,
      "not-supported",
      "Send the resource as application/fhir+json (or application/json); got text/plain.",
    );
    await expectOutcome(
      await post("<Observation/>", { cookie: cookies.clinician, type: "application/fhir+xml" }),
      415,
      "not-supported",
      "Send the resource as application/fhir+json (or application/json); got application/fhir+xml.",
    );
  });

  it("answers a body that is not JSON 400 (structure)", async () => {
    await expectOutcome(await post("{not json", { cookie: cookies.clinician }), 400, "structure", "The request body is not valid JSON.");
  });

  it("answers a body over 16 MiB 413 (too-long)", async () => {
    const big = JSON.stringify({ resourceType: "Bundle", type: "batch", padding: "x".repeat(16 * 1024 * 1024) });
    await expectOutcome(await post(big, { cookie: cookies.clinician }), 413, "too-long", "The request body is larger than 16777216 bytes.");
  });

  it("answers a Bundle of 10,001 Observations 413 whole", async () => {
    const entry = Array.from({ length: 10_001 }, () => ({ resource: { resourceType: "Observation" } }));
    await expectOutcome(
      await post(JSON.stringify({ resourceType: "Bundle", type: "batch", entry }), { cookie: cookies.clinician }),
      413,
      "too-long",
      "A Bundle may carry at most 10000 Observations; this one has 10001. Send them in several requests.",
    );
  });

  it("answers another resource type, a transaction Bundle or an empty Bundle 422 naming the element", async () => {
    const patient = await post(JSON.stringify({ resourceType: "Patient", id: "p" }), { cookie: cookies.clinician });
    expect(patient.status).toBe(422);
    expect(patient.headers.get("content-type")).toBe(FHIR_JSON);
    expect(await patient.json()).toEqual({
      resourceType: "OperationOutcome",
      issue: [{ severity: "error", code: "invalid", diagnostics: "Send an Observation or a Bundle of Observations; got Patient.", expression: ["resourceType"] }],
    });
    const transaction = await post(JSON.stringify({ resourceType: "Bundle", type: "transaction", entry: [{ resource: potassium() }] }), {
      cookie: cookies.clinician,
    });
    expect(transaction.status).toBe(422);
    expect(await transaction.json()).toEqual({
      resourceType: "OperationOutcome",
      issue: [
        {
          severity: "error",
          code: "not-supported",
          diagnostics: 'Bundle.type must be batch or collection (each Observation is scored on its own); got "transaction".',
          expression: ["Bundle.type"],
        },
      ],
    });
    const empty = await post(JSON.stringify({ resourceType: "Bundle", type: "collection", entry: [] }), { cookie: cookies.clinician });
    expect(empty.status).toBe(422);
    expect((await empty.json()).issue[0]).toMatchObject({ code: "required", diagnostics: "The Bundle has no entries to score." });
  });

  it("answers an Observation it cannot read 422 with one issue per element", async () => {
    const res = await post(JSON.stringify(potassium(4.2, { valueQuantity: { value: 4.2, system: "http://example.org/units", code: "mmol/L" } })), {
      cookie: cookies.clinician,
    });
    expect(res.status).toBe(422);
    expect(res.headers.get("content-type")).toBe(FHIR_JSON);
    expect(await res.json()).toEqual({
      resourceType: "OperationOutcome",
      issue: [
        {
          severity: "error",
          code: "invalid",
          diagnostics: 'Observation.valueQuantity.system must be http://unitsofmeasure.org (UCUM); got "http://example.org/units".',
          expression: ["Observation.valueQuantity.system"],
        },
      ],
    });
  });

  it("answers GET 405 with Allow: POST", async () => {
    const res = await fetch(`${BASE_URL}${PATH}`, { headers: { cookie: cookies.clinician } });
    expect(res.headers.get("allow")).toBe("POST");
    await expectOutcome(res, 405, "not-supported", "Use POST to run $score, with an Observation or a Bundle of Observations as the body.");
  });

  it("serves $score at its literal path; %24score and other FHIR paths are a 404 OperationOutcome", async () => {
    // An anonymous POST reaches the operation's own wrapper (401 OperationOutcome), not the API's
    // problem+json 404: the folder named $score is served at the literal path.
    const literal = await post(JSON.stringify(potassium()));
    expect(literal.status).toBe(401);
    // The router does not decode %24 to $: the encoded form is a clean FHIR 404, not the operation.
    const encoded = await post(JSON.stringify(potassium()), { cookie: cookies.clinician, path: "/api/v1/fhir/Observation/%24score" });
    expect(encoded.status).toBe(404);
    expect(encoded.headers.get("content-type")).toBe(FHIR_JSON);
    expect((await encoded.json()).issue).toEqual([
      {
        severity: "error",
        code: "not-found",
        diagnostics: "There is no FHIR endpoint at /api/v1/fhir/Observation/%24score. Bellwether serves POST /api/v1/fhir/Observation/$score.",
      },
    ]);
    await expectOutcome(
      await post(JSON.stringify(potassium()), { cookie: cookies.clinician, path: "/api/v1/fhir/Patient" }),
      404,
      "not-found",
      "There is no FHIR endpoint at /api/v1/fhir/Patient. Bellwether serves POST /api/v1/fhir/Observation/$score.",
    );
  });

  it("scored nothing while refusing", async () => {
    // The score log is written in the background within a second; a refused request adds no entry.
    await new Promise((resolve) => setTimeout(resolve, 1500));
    expect(await scoreLogCount()).toBe(before);
  });
});
