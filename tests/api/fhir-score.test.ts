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
import { createLisConnectionOverHttp, demoLisKey } from "../support/lis";
import { createAnalyte, putInForce, uniqueCode } from "../support/scores";

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

function post(
  body: string | undefined,
  { cookie, key, type = "application/fhir+json", path = PATH }: { cookie?: string; key?: string; type?: string | null; path?: string } = {},
) {
  const headers: Record<string, string> = {};
  if (cookie) headers.cookie = cookie;
  if (key) headers.authorization = `Bearer ${key}`;
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

/** Rows the FHIR route logged (other channels may still be flushing other files' scores). */
async function scoreLogCount(): Promise<number> {
  const [{ n }] = (await pool.query("SELECT count(*)::int AS n FROM score_log WHERE channel = 'fhir'")).rows;
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

interface PartitionRow {
  sex: "F" | "M" | null;
  low: number | null;
  high: number | null;
  unit: string;
  decimals: number;
  number: number;
}

/** The in-force partitions of an analyte, read straight from the tables (not through the app). */
async function inForce(code: string): Promise<PartitionRow[]> {
  const { rows } = await pool.query(
    `SELECT p.sex, p.low, p.high, v.unit, v.decimals, v.number
       FROM interval_partitions p JOIN interval_versions v ON v.id = p.version_id JOIN analytes a ON a.id = v.analyte_id
      WHERE a.code = $1 AND v.state = 'in_force' ORDER BY p.position`,
    [code],
  );
  return rows;
}

const MEANING = "http://terminology.hl7.org/CodeSystem/referencerange-meaning";
const INTERPRETATION = "http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation";
const DEFINITION = "Reference interval: the central 95% of healthy reference individuals (2.5th to 97.5th percentile)";

/** METHODS.md §10.3's element rules for one referenceRange element, against the stored partition. */
function expectReferenceRange(range: Record<string, unknown>, partition: PartitionRow) {
  const r = range as {
    low?: Record<string, unknown>;
    high?: Record<string, unknown>;
    type?: { coding: unknown[]; text: string };
    appliesTo?: { coding: { system: string; code: string }[] }[];
    text?: string;
  };
  // obs-3: a low or a high or text.
  expect(r.low !== undefined || r.high !== undefined || typeof r.text === "string").toBe(true);
  // Inclusive bounds as SimpleQuantity (no comparator) in UCUM.
  expect(r.low).toEqual({ value: partition.low, unit: partition.unit, system: UCUM, code: partition.unit });
  expect(r.high).toEqual({ value: partition.high, unit: partition.unit, system: UCUM, code: partition.unit });
  expect(r.type?.coding).toEqual([{ system: MEANING, code: "normal", display: "Normal Range" }]);
  expect(r.type?.text).toBe(DEFINITION);
  expect(r.text).toContain(DEFINITION);
  // SNOMED CT Female 248152002 / Male 248153007 (FHIR R4 referencerange-appliesto value set).
  if (partition.sex === null) expect(r.appliesTo).toBeUndefined();
  else expect(r.appliesTo?.[0].coding[0]).toMatchObject({ system: "http://snomed.info/sct", code: partition.sex === "F" ? "248152002" : "248153007" });
}

type Json = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

async function scoreOverApi(item: Record<string, unknown>): Promise<{ result: Json; cautionTexts: Record<string, string> }> {
  const res = await fetch(`${BASE_URL}/api/v1/scores`, {
    method: "POST",
    headers: { cookie: cookies.clinician, "content-type": "application/json" },
    body: JSON.stringify({ items: [item] }),
  });
  expect(res.status).toBe(200);
  const body = await res.json();
  return { result: body.results[0], cautionTexts: body.cautionTexts };
}

describe("scoring an Observation", () => {
  for (const role of ROLES) {
    it(`answers the ${role} 200 with the Observation filled in`, async () => {
      const res = await post(JSON.stringify(potassium()), { cookie: cookies[role] });
      expect(res.status).toBe(200);
      expect(res.headers.get("content-type")).toBe(FHIR_JSON);
      expect((await res.json()).resourceType).toBe("Observation");
    });
  }

  it("fills referenceRange, interpretation and the z and percentile components per METHODS.md §10.3", async () => {
    const [k] = await inForce("K");
    const value = (k.low! + k.high!) / 2;
    const res = await post(JSON.stringify(potassium(value)), { cookie: cookies.clinician });
    expect(res.status).toBe(200);
    const obs: Json = await res.json();
    // What was sent comes back untouched.
    expect(obs).toMatchObject({ id: "k-1", status: "final", subject: { reference: "#pat" }, effectiveDateTime: "2026-03-02T08:15:00Z" });
    expect(obs.valueQuantity).toEqual({ value, unit: "mmol/L", system: UCUM, code: "mmol/L" });
    expect(obs.referenceRange).toHaveLength(1);
    expectReferenceRange(obs.referenceRange[0], k);
    expect(obs.interpretation).toEqual([{ coding: [{ system: INTERPRETATION, code: "N", display: "Normal" }], text: "Normal" }]);
    // The same numbers as POST /api/v1/scores gives for the same item.
    const { result: api, cautionTexts } = await scoreOverApi({ loinc: "2823-3", value, unit: "mmol/L", sex: "female", birthDate: "1971-06-14", collectedAt: "2026-03-02T08:15:00Z" });
    expect(obs.component).toEqual([
      {
        code: { coding: [{ system: "urn:bellwether:codesystem:score-component", code: "z-score", display: "z-score among healthy reference individuals" }], text: "z-score" },
        valueQuantity: { value: api.z, unit: "1", system: UCUM, code: "1" },
      },
      {
        code: { coding: [{ system: "urn:bellwether:codesystem:score-component", code: "percentile", display: "Percentile among healthy reference individuals" }], text: "Percentile" },
        valueQuantity: { value: api.percentile, unit: "%", system: UCUM, code: "%" },
      },
    ]);
    // Components do not inherit the parent's referenceRange and carry none of their own.
    for (const c of obs.component) expect(c.referenceRange).toBeUndefined();
    // The cautions in full sentences, after the version line.
    expect(obs.note[0].text).toBe(`Scored by Bellwether against interval version ${k.number}, in force from ${api.interval.effectiveFrom}.`);
    expect(api.cautions).toContain("general");
    expect(obs.note.slice(1).map((n: Json) => n.text)).toEqual((api.cautions as string[]).map((c) => cautionTexts[c]));
  });

  it("flags a value at the low limit N (inclusive) and below it L, above the high limit H", async () => {
    const [k] = await inForce("K");
    const codeOf = async (value: number) => ((await (await post(JSON.stringify(potassium(value)), { cookie: cookies.clinician })).json()) as Json).interpretation[0].coding[0].code;
    expect(await codeOf(k.low!)).toBe("N");
    expect(await codeOf(k.high!)).toBe("N");
    expect(await codeOf(k.low! - 0.3)).toBe("L");
    expect(await codeOf(k.high! + 0.3)).toBe("H");
  });

  it("reads a comparator as a censored value and gives the bound with the Quantity comparator", async () => {
    // "<low": the true value is below the low limit, so L (lib/scoring's flagCensored; the demo's
    // critical low of 2.8 mmol/L lies below the interval, so LL is not reached).
    const [k] = await inForce("K");
    const res = await post(JSON.stringify(potassium(k.low!, { valueQuantity: { value: k.low, comparator: "<", unit: "mmol/L", system: UCUM, code: "mmol/L" } })), {
      cookie: cookies.clinician,
    });
    expect(res.status).toBe(200);
    const obs: Json = await res.json();
    expect(obs.interpretation[0].coding[0].code).toBe("L");
    expect(obs.component.map((c: Json) => c.valueQuantity.comparator)).toEqual(["<", "<"]);
  });

  it("takes the partition of the contained Patient's sex (appliesTo) ", async () => {
    const partitions = await inForce("HGB");
    expect(partitions.map((p) => p.sex).sort()).toEqual(["F", "M"]);
    for (const sex of ["F", "M"] as const) {
      const gender = sex === "F" ? "female" : "male";
      const res = await post(
        JSON.stringify(
          potassium(140, {
            contained: [{ resourceType: "Patient", id: "pat", gender, birthDate: "1980-01-31" }],
            code: { coding: [{ system: "http://loinc.org", code: "718-7" }] },
            valueQuantity: { value: 140, unit: "g/L", system: UCUM, code: "g/L" },
          }),
        ),
        { cookie: cookies.clinician },
      );
      expect(res.status).toBe(200);
      expectReferenceRange((await res.json()).referenceRange[0], partitions.find((p) => p.sex === sex)!);
    }
  });

  it("converts another UCUM unit, keeping the value as sent and the referenceRange in the interval's unit", async () => {
    const [glu] = await inForce("GLU");
    const res = await post(
      JSON.stringify(
        potassium(90, {
          code: { coding: [{ system: "http://loinc.org", code: "14749-6" }] },
          valueQuantity: { value: 90, unit: "mg/dL", system: UCUM, code: "mg/dL" },
        }),
      ),
      { cookie: cookies.clinician, type: "application/json" },
    );
    expect(res.status).toBe(200);
    const obs: Json = await res.json();
    expect(obs.valueQuantity.code).toBe("mg/dL");
    expectReferenceRange(obs.referenceRange[0], glu);
    expect(obs.referenceRange[0].low.code).toBe("mmol/L");
    expect(obs.note.some((n: Json) => /converted/.test(n.text))).toBe(true);
  });

  it("answers the score service's refusals as OperationOutcomes with FHIR issue types", async () => {
    const unknown = await post(JSON.stringify(potassium(4, { code: { coding: [{ system: "http://loinc.org", code: "99999-9" }] } })), {
      cookie: cookies.clinician,
    });
    expect(unknown.status).toBe(404);
    expect(unknown.headers.get("content-type")).toBe(FHIR_JSON);
    expect(await unknown.json()).toEqual({
      resourceType: "OperationOutcome",
      issue: [{ severity: "error", code: "code-invalid", diagnostics: "Unknown analyte: No analyte has the LOINC code 99999-9.", expression: ["Observation.code"] }],
    });

    // Alkaline phosphatase awaits sign-off in the demo: nothing is in force.
    const none = await post(
      JSON.stringify(potassium(80, { code: { coding: [{ system: "http://loinc.org", code: "6768-6" }] }, valueQuantity: { value: 80, system: UCUM, code: "U/L" } })),
      { cookie: cookies.clinician },
    );
    expect(none.status).toBe(422);
    expect((await none.json()).issue).toEqual([
      {
        severity: "error",
        code: "processing",
        diagnostics: "No interval in force: There is no interval in force for ALP (Alkaline phosphatase): none has been signed off, or the one in force was withdrawn.",
        expression: ["Observation.code"],
      },
    ]);

    // Haemoglobin is partitioned by sex: without the Patient no partition applies.
    const noSex = await post(
      JSON.stringify({
        resourceType: "Observation",
        status: "final",
        code: { coding: [{ system: "http://loinc.org", code: "718-7" }] },
        valueQuantity: { value: 140, system: UCUM, code: "g/L" },
      }),
      { cookie: cookies.clinician },
    );
    expect(noSex.status).toBe(422);
    const noSexIssue = (await noSex.json()).issue[0];
    expect(noSexIssue).toMatchObject({ severity: "error", code: "processing", expression: ["Observation.subject"] });
    expect(noSexIssue.diagnostics).toMatch(/^No partition applies: The interval in force for HGB \(version \d+\) is partitioned by sex/);
    expect(noSexIssue.diagnostics).toContain("In FHIR, sex and age come from the contained Patient");

    const badUnit = await post(JSON.stringify(potassium(4, { valueQuantity: { value: 4, system: UCUM, code: "kg" } })), { cookie: cookies.clinician });
    expect(badUnit.status).toBe(422);
    expect((await badUnit.json()).issue[0]).toMatchObject({ code: "value", expression: ["Observation.valueQuantity.code"] });
  });
});

describe("scoring a Bundle", () => {
  it("answers a batch-response with each entry's status and Observation or OperationOutcome, in order", async () => {
    const bundle = {
      resourceType: "Bundle",
      type: "batch",
      entry: [
        { fullUrl: "urn:uuid:0d4c9e0e-0000-4000-8000-000000000001", resource: potassium(4.2), request: { method: "POST", url: "Observation/$score" } },
        { fullUrl: "urn:uuid:0d4c9e0e-0000-4000-8000-000000000002", resource: potassium(4.2, { valueQuantity: undefined }) },
        { resource: potassium(4, { code: { coding: [{ system: "http://loinc.org", code: "99999-9" }] } }) },
        { resource: { resourceType: "Patient" } },
        { resource: potassium(5.6) },
      ],
    };
    const res = await post(JSON.stringify(bundle), { cookie: cookies.clinician });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe(FHIR_JSON);
    const out: Json = await res.json();
    expect(out.resourceType).toBe("Bundle");
    expect(out.type).toBe("batch-response");
    expect(out.entry.map((e: Json) => e.response.status)).toEqual(["200 OK", "422 Unprocessable Entity", "404 Not Found", "422 Unprocessable Entity", "200 OK"]);
    expect(out.entry[0].fullUrl).toBe("urn:uuid:0d4c9e0e-0000-4000-8000-000000000001");
    expect(out.entry[0].resource.interpretation[0].coding[0].code).toBe("N");
    expect(out.entry[1]).toEqual({
      fullUrl: "urn:uuid:0d4c9e0e-0000-4000-8000-000000000002",
      response: {
        status: "422 Unprocessable Entity",
        outcome: {
          resourceType: "OperationOutcome",
          issue: [{ severity: "error", code: "required", diagnostics: "Observation.valueQuantity is required: a numeric result with its UCUM unit.", expression: ["Observation.valueQuantity"] }],
        },
      },
    });
    expect(out.entry[2].response.outcome.issue[0].code).toBe("code-invalid");
    expect(out.entry[3].response.outcome.issue[0].diagnostics).toBe("Expected an Observation; got Patient.");
    expect(out.entry[4].resource.interpretation[0].coding[0].code).toBe("H");
    for (const e of out.entry) expect(e.resource === undefined || e.response.outcome === undefined).toBe(true);
  });

  it("answers a collection Bundle as a batch-response too", async () => {
    const res = await post(JSON.stringify({ resourceType: "Bundle", type: "collection", entry: [{ resource: potassium() }] }), { cookie: cookies.clinician });
    expect(res.status).toBe(200);
    const out: Json = await res.json();
    expect(out.type).toBe("batch-response");
    expect(out.entry[0].response.status).toBe("200 OK");
  });

  it("logs the scores with the channel fhir", async () => {
    // Two values no other test sends, so that their rows can be counted alone.
    const values = [4.0 + Math.random() / 1000, 4.2 + Math.random() / 1000];
    const count = async () =>
      (await pool.query("SELECT count(*)::int AS n FROM score_log WHERE channel = 'fhir' AND caller_kind = 'user' AND value = ANY($1::float8[])", [values])).rows[0].n;
    expect(await count()).toBe(0);
    const res = await post(JSON.stringify({ resourceType: "Bundle", type: "batch", entry: values.map((v) => ({ resource: potassium(v) })) }), {
      cookie: cookies.clinician,
    });
    expect(res.status).toBe(200);
    // The log is written in the background (every second): wait for it, without timing it.
    let n = 0;
    for (let i = 0; i < 50 && n < 2; i++) {
      await new Promise((resolve) => setTimeout(resolve, 200));
      n = await count();
    }
    expect(n).toBe(2);
  });
});

describe("GET /api/v1/analytes/{code}/intervals", () => {
  it("gives each in-force partition as a FHIR referenceRange, and the list beside them", async () => {
    const stored = await inForce("HGB");
    const res = await fetch(`${BASE_URL}/api/v1/analytes/HGB/intervals`, { headers: { cookie: cookies.clinician } });
    expect(res.status).toBe(200);
    const body: Json = await res.json();
    expect(body.partitions).toHaveLength(stored.length);
    for (const p of body.partitions) {
      const row = stored.find((s) => s.sex === p.sex)!;
      expectReferenceRange(p.referenceRange, row);
      expect(p.referenceRange.age).toBeUndefined();
    }
    expect(body.referenceRange).toEqual(body.partitions.map((p: Json) => p.referenceRange));
  });

  it("gives an empty list when nothing is in force", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/analytes/ALP/intervals`, { headers: { cookie: cookies.clinician } });
    expect(res.status).toBe(200);
    const body: Json = await res.json();
    expect(body.version).toBeNull();
    expect(body.referenceRange).toEqual([]);
  });
});

describe("LIS keys", () => {
  it("scores with the demo connection's key, logged as the LIS on the fhir channel", async () => {
    const value = 4.4 + Math.random() / 1000;
    const res = await post(JSON.stringify(potassium(value)), { key: demoLisKey() });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe(FHIR_JSON);
    expect((await res.json()).interpretation[0].coding[0].code).toBe("N");
    const count = async () => (await pool.query("SELECT count(*)::int AS n FROM score_log WHERE channel = 'fhir' AND caller_kind = 'lis' AND value = $1", [value])).rows[0].n;
    let n = 0;
    for (let i = 0; i < 50 && n < 1; i++) {
      await new Promise((resolve) => setTimeout(resolve, 200));
      n = await count();
    }
    expect(n).toBe(1);
  });

  it("reads the intervals with their referenceRange with a key", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/analytes/K/intervals`, { headers: { authorization: `Bearer ${demoLisKey()}` } });
    expect(res.status).toBe(200);
    const body: Json = await res.json();
    expectReferenceRange(body.referenceRange[0], (await inForce("K"))[0]);
  });

  it("answers a forged key 401 and a revoked key 401 as OperationOutcomes", async () => {
    const forged = `bwk_${"A".repeat(43)}`;
    const unknown = await post(JSON.stringify(potassium()), { key: forged });
    expect(unknown.headers.get("www-authenticate")).toBe('Bearer realm="bellwether"');
    await expectOutcome(
      unknown,
      401,
      "login",
      "The API key was not recognised. Send the whole key as `Authorization: Bearer bwk_…`, or ask your Bellwether administrator for a new one.",
    );
    const { id, key } = await createLisConnectionOverHttp(cookies.admin, { name: `FHIR revoked ${uniqueCode("R")}`, contactEmail: uniqueEmail("fhir-lis") });
    expect((await post(JSON.stringify(potassium()), { key })).status).toBe(200);
    const revoke = await fetch(`${BASE_URL}/api/v1/lis-connections/${id}/revoke`, { method: "POST", headers: { cookie: cookies.admin } });
    expect(revoke.status).toBe(200);
    // Revocation reaches the key store through a notification: wait for it to take effect.
    let res = await post(JSON.stringify(potassium()), { key });
    for (let i = 0; i < 50 && res.status === 200; i++) {
      await new Promise((resolve) => setTimeout(resolve, 100));
      res = await post(JSON.stringify(potassium()), { key });
    }
    await expectOutcome(res, 401, "login", "This API key has been revoked. Ask your Bellwether administrator for a new one.");
  });

  it("answers a connection over its rate limit 429 (throttled) with Retry-After", async () => {
    const name = `FHIR limited ${uniqueCode("L")}`;
    const { key } = await createLisConnectionOverHttp(cookies.admin, { name, contactEmail: uniqueEmail("fhir-rate"), ratePerMinute: 2 });
    const statuses: number[] = [];
    let refused: Response | null = null;
    for (let i = 0; i < 5 && refused === null; i++) {
      const res = await post(JSON.stringify(potassium()), { key });
      statuses.push(res.status);
      if (res.status !== 200) refused = res;
    }
    // The limiter's own tests check how many pass; here: the first does, and the refusal is FHIR's.
    expect(statuses[0]).toBe(200);
    expect(refused?.status).toBe(429);
    expect(Number(refused!.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(refused!.headers.get("content-type")).toBe(FHIR_JSON);
    const outcome: Json = await refused!.json();
    expect(outcome.resourceType).toBe("OperationOutcome");
    expect(outcome.issue).toHaveLength(1);
    expect(outcome.issue[0]).toMatchObject({ severity: "error", code: "throttled" });
    expect(outcome.issue[0].diagnostics).toMatch(new RegExp(`^The LIS connection "${name}" may make 2 requests a minute and has used them`));
  });
});

describe("age bands and one-sided intervals", () => {
  let code = "";
  beforeAll(async () => {
    code = uniqueCode("FA");
    await createAnalyte(cookies, { code, name: "FHIR age bands (test)", unit: "U/L", decimals: 0 });
    // Children [0, 18 years) and adults [18 years, ∞) in days by lib/versions/age-days.ts's rule
    // (18 × 365.25 = 6574.5 → 6575); the adults' interval has an upper limit only.
    await putInForce(pool, cookies, code, [
      { ageFromDays: 0, ageToDays: 6575, low: 100, high: 400, method: "adopted", n: 20, model: { kind: "zlog", scale: "log" } },
      { ageFromDays: 6575, ageToDays: null, low: null, high: 130, method: "adopted", n: 20, model: { kind: "limits" } },
    ]);
  });

  function observationOf(birthDate: string, value: number) {
    return {
      resourceType: "Observation",
      status: "final",
      contained: [{ resourceType: "Patient", id: "pat", birthDate }],
      subject: { reference: "#pat" },
      code: { coding: [{ system: "urn:bellwether:codesystem:analyte", code }] },
      effectiveDateTime: "2026-03-02",
      valueQuantity: { value, system: UCUM, code: "U/L" },
    };
  }

  it("gives a child's band as age Range 0 to 18 years (UCUM a)", async () => {
    const res = await post(JSON.stringify(observationOf("2016-05-01", 200)), { cookie: cookies.clinician });
    expect(res.status).toBe(200);
    const range: Json = (await res.json()).referenceRange[0];
    expect(range.age).toEqual({
      low: { value: 0, unit: "years", system: UCUM, code: "a" },
      high: { value: 18, unit: "years", system: UCUM, code: "a" },
    });
    expect(range.appliesTo).toBeUndefined();
    expect(range.text).toBe(`100 to 400 U/L; age under 18 years. ${DEFINITION}.`);
  });

  it("gives the adults' one-sided interval with high only, obs-3 holding, and no z or percentile", async () => {
    const res = await post(JSON.stringify(observationOf("1970-05-01", 150)), { cookie: cookies.clinician });
    expect(res.status).toBe(200);
    const obs: Json = await res.json();
    const range = obs.referenceRange[0];
    expect(range.low).toBeUndefined();
    expect(range.high).toEqual({ value: 130, unit: "U/L", system: UCUM, code: "U/L" });
    expect(range.age).toEqual({ low: { value: 18, unit: "years", system: UCUM, code: "a" } });
    expect(range.text).toBe(`130 U/L or less (upper limit only); age 18 years and over. ${DEFINITION}.`);
    expect(obs.interpretation[0].coding[0].code).toBe("H");
    expect(obs.component.map((c: Json) => [c.valueQuantity, c.dataAbsentReason?.coding[0].code])).toEqual([
      [undefined, "not-applicable"],
      [undefined, "not-applicable"],
    ]);
  });

  it("lists both bands in the intervals route", async () => {
    const body: Json = await (await fetch(`${BASE_URL}/api/v1/analytes/${code}/intervals`, { headers: { cookie: cookies.clinician } })).json();
    expect(body.referenceRange.map((r: Json) => r.age)).toEqual([
      { low: { value: 0, unit: "years", system: UCUM, code: "a" }, high: { value: 18, unit: "years", system: UCUM, code: "a" } },
      { low: { value: 18, unit: "years", system: UCUM, code: "a" } },
    ]);
  });
});
