/**
 * The bad-input corpus, API part: awkward and malformed JSON bodies, content types, query strings
 * and FHIR resources sent to the real route handlers. Each is refused with its exact status and
 * message (problem+json; an OperationOutcome on the FHIR route) and changes no table, or is
 * accepted and read as sent. The row count of every table of the schema is compared before and
 * after each request (tests/support/bad-input.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { signInOverHttp } from "../support/http-session";
import { demoLisKey } from "../support/lis";
import { countEveryTable, expectRefusal, grown, ownerPool, scoreLogReaches, scoreLogSettled, sendRaw, type Sent } from "../support/bad-input";

const { pool } = testDatabase();
const owner = ownerPool();
afterAll(async () => {
  await pool.end();
  await owner.end();
});

let scientist: string;
let admin: string;
let key: string;
beforeAll(async () => {
  scientist = await signInOverHttp(demoUser("scientist").email, demoUser("scientist").password);
  admin = await signInOverHttp(demoUser("admin").email, demoUser("admin").password);
  key = demoLisKey();
  await scoreLogSettled(owner);
});

const JSON_TYPE = "application/json";
const study = (over: Record<string, unknown> = {}) => ({ analyte: "GLU", title: "Bad input: study", method: "Hexokinase", specimen: "plasma", ...over });
const postStudy = (bytes: string | Uint8Array, type: string | null = JSON_TYPE) => sendRaw("POST", "/api/v1/studies", { cookie: scientist }, { bytes, type });
const score = (items: unknown) => sendRaw("POST", "/api/v1/scores", { key }, { bytes: JSON.stringify({ items }), type: JSON_TYPE });
const fhir = (bytes: string, type: string | null = "application/fhir+json") =>
  sendRaw("POST", "/api/v1/fhir/Observation/$score", { key }, { bytes, type });

/** `depth` arrays nested in one another around a number: `[[[…1…]]]`. */
const nested = (depth: number) => "[".repeat(depth) + "1" + "]".repeat(depth);

interface Refusal {
  send: () => Promise<Sent>;
  status: number;
  detail: string;
}

const refusals: Record<string, Refusal> = {
  "a JSON body sent as text/plain": {
    send: () => postStudy(JSON.stringify(study()), "text/plain"),
    status: 415,
    detail: "Send the request body as application/json.",
  },
  "a JSON body without a content type": {
    send: () => postStudy(JSON.stringify(study()), null),
    status: 415,
    detail: "Send the request body as application/json.",
  },
  "a content type that only contains application/json": {
    send: () => postStudy(JSON.stringify(study()), "text/plain; note=application/json"),
    status: 415,
    detail: "Send the request body as application/json.",
  },
  "JSON cut off half-way": { send: () => postStudy('{"analyte": "GLU", "title": '), status: 400, detail: "The request body is not valid JSON." },
  "an empty body": { send: () => postStudy(""), status: 400, detail: "The request body is not valid JSON." },
  "invalid UTF-8 (a lone 0xFF byte in a string)": {
    send: () => postStudy(Buffer.concat([Buffer.from('{"analyte": "GLU", "title": "Gl'), Buffer.from([0xff]), Buffer.from('cose"}')])),
    status: 400,
    detail: "The request body is not valid UTF-8 text: send JSON encoded as UTF-8.",
  },
  "JSON encoded as UTF-16": {
    send: () => postStudy(Buffer.from(JSON.stringify(study()), "utf16le")),
    status: 400,
    detail: "The request body is not valid JSON.",
  },
  "the JSON literal null": { send: () => postStudy("null"), status: 422, detail: "(root): Invalid input: expected object, received null" },
  "a JSON array instead of an object": { send: () => postStudy("[]"), status: 422, detail: "(root): Invalid input: expected object, received array" },
  "wrong types (a number for the title, true for the analyte)": {
    send: () => postStudy(JSON.stringify(study({ title: 123, analyte: true }))),
    status: 422,
    detail: "analyte: Invalid input: expected string, received boolean; title: Invalid input: expected string, received number",
  },
  "missing fields": {
    send: () => postStudy(JSON.stringify({ method: "Hexokinase" })),
    status: 422,
    detail: "analyte: Invalid input: expected string, received undefined; title: Invalid input: expected string, received undefined",
  },
  "a title of 201 characters": {
    send: () => postStudy(JSON.stringify(study({ title: "T".repeat(201) }))),
    status: 422,
    detail: "title: Too big: expected string to have <=200 characters",
  },
  "a body over 1 MiB": {
    send: () => postStudy(JSON.stringify(study({ criteria: "c".repeat(1 << 20) }))),
    status: 413,
    detail: "The request body is larger than 1048576 bytes.",
  },
  "a title nested 100,000 arrays deep": {
    send: () => postStudy(`{"analyte": "GLU", "title": ${nested(100_000)}}`),
    status: 422,
    detail: "title: Invalid input: expected string, received array",
  },
  "a body of 500,000 nested arrays": { send: () => postStudy(nested(500_000)), status: 422, detail: "(root): Invalid input: expected object, received array" },
  "a NUL character (\\u0000) in the title": {
    send: () => postStudy(JSON.stringify(study({ title: "Glu\u0000cose" }))),
    status: 422,
    detail: "title: the text holds the character U+0000 (NUL), which cannot be stored; remove it.",
  },
  "an unpaired surrogate (\\ud800) in the criteria": {
    send: () => postStudy('{"analyte": "GLU", "title": "Glucose", "criteria": "adults \\ud800 only"}'),
    status: 422,
    detail: "criteria: the text holds an unpaired UTF-16 surrogate (U+D800), which is not a character; send valid Unicode text.",
  },
  "a __proto__ key": {
    send: () => postStudy('{"analyte": "GLU", "title": "Glucose", "__proto__": {"status": "closed"}}'),
    status: 422,
    detail: '(root): Unrecognized key: "__proto__"',
  },
  "a collection date that is not in the calendar": {
    send: () => postStudy(JSON.stringify(study({ collectedFrom: "2026-02-30" }))),
    status: 422,
    detail: "collectedFrom: Invalid ISO date",
  },
  "spreadsheet formula text as the analyte code": {
    send: () => postStudy(JSON.stringify(study({ analyte: "=A1+1" }))),
    status: 422,
    detail: "There is no analyte with the code =A1+1.",
  },
  "a study id that is SQL": {
    send: () => sendRaw("GET", "/api/v1/studies/1%27%20OR%20%271%27%3D%271", { cookie: scientist }),
    status: 422,
    detail: "id: The study id must be a UUID.",
  },
  "a page size of a million": {
    send: () => sendRaw("GET", "/api/v1/studies/00000000-0000-4000-8000-000000000000/donor-results?pageSize=1000000", { cookie: scientist }),
    status: 422,
    detail: "pageSize: pageSize is a whole number from 1 to 500.",
  },
  "a NUL character in a query string": {
    send: () => sendRaw("GET", "/api/v1/studies/00000000-0000-4000-8000-000000000000/donor-results/lookup?codes=A1,%00", { cookie: scientist }),
    status: 422,
    detail: "codes: the text holds the character U+0000 (NUL), which cannot be stored; remove it.",
  },
  "10,001 score items": {
    send: () => score(Array.from({ length: 10_001 }, () => ({ analyte: "GLU", value: 5.1 }))),
    status: 413,
    detail: "A request may carry at most 10000 items; this one has 10001. Send them in several requests.",
  },
  "score items that are not an array": { send: () => score("GLU 5.1"), status: 422, detail: "items: Invalid input: expected array, received string" },
  "no score items": { send: () => score([]), status: 422, detail: "items: send at least one item" },
  "an LIS connection name with a NUL character": {
    send: () =>
      sendRaw("POST", "/api/v1/lis-connections", { cookie: admin }, {
        bytes: JSON.stringify({ name: "Ward\u0000LIS", contactEmail: "lis@example.invalid" }),
        type: JSON_TYPE,
      }),
    status: 422,
    detail: "name: the text holds the character U+0000 (NUL), which cannot be stored; remove it.",
  },
  "adoption check values that are strings and NaN": {
    send: () =>
      sendRaw("POST", "/api/v1/adoption-checks", { cookie: scientist }, {
        bytes: JSON.stringify({ analyte: "K", lower: 3.5, upper: 5.1, source: "Package insert", values: [...Array(19).fill(4.2), "NaN"] }),
        type: JSON_TYPE,
      }),
    status: 422,
    detail: "values.19: each value is a number in the analyte's unit.",
  },
};

describe("JSON, content types and query strings refused", () => {
  for (const [what, c] of Object.entries(refusals)) {
    it(`refuses ${what} with ${c.status}, changing no table`, async () => {
      const before = await countEveryTable(owner);
      expectRefusal(await c.send(), c.status, c.detail);
      expect(await countEveryTable(owner)).toEqual(before);
    });
  }
});

describe("awkward JSON accepted and read as sent", () => {
  it("reads a content type in capitals with a charset", async () => {
    const before = await countEveryTable(owner);
    const sent = await postStudy(JSON.stringify(study({ title: "Capital content type" })), "APPLICATION/JSON; charset=UTF-8");
    expect(sent.status).toBe(201);
    expect(sent.json).toMatchObject({ title: "Capital content type" });
    expect(await countEveryTable(owner)).toEqual(grown(before, { studies: 1, audit_events: 1 }));
  });

  const texts: Record<string, string> = {
    "SQL and HTML fragments": `Robert'); DROP TABLE studies;-- <script>alert('bw')</script> <img src=x onerror=alert(1)>`,
    "spreadsheet formula text": `=cmd|' /C calc'!A0`,
    "control characters (bell, escape) and a right-to-left override": "Glucose \u0007\u001b[31m \u202e reversed",
    "emoji and characters outside the Basic Multilingual Plane": "Glucose 🧪 𝔤𝔩𝔲",
  };
  for (const [what, text] of Object.entries(texts)) {
    it(`stores ${what} in a title and criteria exactly, as text`, async () => {
      const before = await countEveryTable(owner);
      const sent = await postStudy(JSON.stringify(study({ title: text, criteria: `Criteria: ${text}` })));
      expect(sent.status).toBe(201);
      expect(await countEveryTable(owner)).toEqual(grown(before, { studies: 1, audit_events: 1 }));
      const [row] = (await pool.query("SELECT title, criteria FROM studies WHERE id = $1", [sent.json!.id])).rows;
      expect(row).toEqual({ title: text, criteria: `Criteria: ${text}` });
      const read = await sendRaw("GET", `/api/v1/studies/${sent.json!.id}`, { cookie: scientist });
      expect(read.json).toMatchObject({ title: text, criteria: `Criteria: ${text}` });
    });
  }
});

describe("score items: awkward values each answered in their place", () => {
  // Each item alone in a request: one bad item answers an error in its place (DESIGN.md), the
  // request is 200 and nothing is logged for it; a good one is scored and logged.
  const itemErrors: Record<string, [unknown, string]> = {
    "1e309 as text": ["1e309", 'value "1e309" is neither a number nor a censored result such as "<0.5" or ">1000".'],
    NaN: ["NaN", 'value "NaN" is neither a number nor a censored result such as "<0.5" or ">1000".'],
    "a decimal comma": ["4,5", 'value "4,5" is neither a number nor a censored result such as "<0.5" or ">1000".'],
    "a censoring sign without a limit": ["<", 'value "<" is neither a number nor a censored result such as "<0.5" or ">1000".'],
    "two censoring signs": [">>3", 'value ">>3" is neither a number nor a censored result such as "<0.5" or ">1000".'],
    "spreadsheet formula text": ["=cmd|' /C calc'!A0", "value \"=cmd|' /C calc'!A0\" is neither a number nor a censored result such as \"<0.5\" or \">1000\"."],
    "an object": [{ amount: 5.1 }, "value: Invalid input"],
    "an array nested 1,000 deep": [JSON.parse(nested(1000)), "value: Invalid input"],
  };
  for (const [what, [value, detail]] of Object.entries(itemErrors)) {
    it(`answers ${what} as the item's error`, async () => {
      const before = await countEveryTable(owner);
      const sent = await score([{ analyte: "GLU", value, ref: "r1" }]);
      expect(sent.status).toBe(200);
      const [result] = (sent.json as { results: { ref?: string; error?: { type: string; detail: string } }[] }).results;
      expect(result).toEqual({ ref: "r1", error: { type: "urn:bellwether:problem:invalid", title: "Invalid item", detail } });
      expect(await countEveryTable(owner)).toEqual(before);
    });
  }

  it("scores -0 as 0, and logs each score and nothing else", async () => {
    const before = await countEveryTable(owner);
    const zero = await score([{ analyte: "GLU", value: 0 }]);
    const negativeZero = await sendRaw("POST", "/api/v1/scores", { key }, { bytes: '{"items": [{"analyte": "GLU", "value": -0}]}', type: JSON_TYPE });
    expect(negativeZero.status).toBe(200);
    expect(negativeZero.json).toEqual(zero.json);
    await scoreLogReaches(owner, before.score_log + 2);
    expect(await countEveryTable(owner)).toEqual(grown(before, { score_log: 2 }));
  });

  it("echoes HTML in an item's ref as JSON text", async () => {
    const before = await countEveryTable(owner);
    const sent = await score([{ analyte: "GLU", value: 5.1, ref: "<script>alert(1)</script>" }]);
    expect(sent.status).toBe(200);
    expect(sent.contentType).toBe("application/json");
    expect((sent.json as { results: { ref: string }[] }).results[0].ref).toBe("<script>alert(1)</script>");
    await scoreLogReaches(owner, before.score_log + 1);
    expect(await countEveryTable(owner)).toEqual(grown(before, { score_log: 1 }));
  });
});

describe("FHIR $score: wrong resources answered with an OperationOutcome", () => {
  const outcomes: Record<string, { send: () => Promise<Sent>; status: number; code: string; diagnostics: string }> = {
    "a Patient instead of an Observation": {
      send: () => fhir(JSON.stringify({ resourceType: "Patient", id: "p1", gender: "female" })),
      status: 422,
      code: "invalid",
      diagnostics: "Send an Observation or a Bundle of Observations; got Patient.",
    },
    "a resource without resourceType": {
      send: () => fhir(JSON.stringify({ status: "final", valueQuantity: { value: 5.1 } })),
      status: 422,
      code: "invalid",
      diagnostics: "Send a FHIR resource: an Observation, or a Bundle of Observations.",
    },
    "a Bundle of type transaction": {
      send: () => fhir(JSON.stringify({ resourceType: "Bundle", type: "transaction", entry: [] })),
      status: 422,
      code: "not-supported",
      diagnostics: 'Bundle.type must be batch or collection (each Observation is scored on its own); got "transaction".',
    },
    "text that is not JSON": { send: () => fhir("<Observation/>"), status: 400, code: "structure", diagnostics: "The request body is not valid JSON." },
    "XML's content type": {
      send: () => fhir("<Observation/>", "application/fhir+xml"),
      status: 415,
      code: "not-supported",
      diagnostics: "Send the resource as application/fhir+json (or application/json); got application/fhir+xml.",
    },
    "a NUL character in the Observation": {
      send: () => fhir(JSON.stringify({ resourceType: "Observation", status: "final", id: "o\u0000" })),
      status: 422,
      code: "invalid",
      diagnostics: "id: the text holds the character U+0000 (NUL), which cannot be stored; remove it.",
    },
  };
  for (const [what, c] of Object.entries(outcomes)) {
    it(`refuses ${what} with ${c.status}, changing no table`, async () => {
      const before = await countEveryTable(owner);
      const sent = await c.send();
      expect({ status: sent.status, contentType: sent.contentType, resourceType: sent.json?.resourceType }).toEqual({
        status: c.status,
        contentType: "application/fhir+json; charset=utf-8",
        resourceType: "OperationOutcome",
      });
      const [issue] = (sent.json as { issue: { severity: string; code: string; diagnostics: string }[] }).issue;
      expect({ code: issue.code, diagnostics: issue.diagnostics }).toEqual({ code: c.code, diagnostics: c.diagnostics });
      expect(await countEveryTable(owner)).toEqual(before);
    });
  }
});
