/**
 * The API's worked examples, in one place: the OpenAPI document shows them, the API page prints
 * them as curl commands, and an integration test sends every one to the served app, so an
 * example that stops working fails a test. Analyte codes, units and LOINC codes are the demo
 * laboratory's (db/seed.ts).
 */

export interface ApiExample {
  id: string;
  title: string;
  /** One or two sentences saying what the example shows. */
  summary: string;
  method: "GET" | "POST";
  /** The path under the server, e.g. /api/v1/scores. */
  path: string;
  contentType?: "application/json" | "application/fhir+json";
  body?: unknown;
}

/** One potassium value of a 54-year-old woman. */
export const scoreOneExample = {
  items: [{ analyte: "K", value: 4.9, unit: "mmol/L", sex: "F", ageYears: 54, ref: "1001/K" }],
};

/**
 * A panel of one patient: codes and a LOINC code, exact age from the birth date and the collection
 * time, a value in another unit (creatinine in mg/dL, converted with its molar mass).
 */
export const scoreBatchExample = {
  items: [
    { analyte: "NA", value: 141, sex: "M", birthDate: "1968-11-03", collectedAt: "2026-03-02T08:15:00Z", ref: "2002/NA" },
    { analyte: "K", value: 5.6, sex: "M", birthDate: "1968-11-03", collectedAt: "2026-03-02T08:15:00Z", ref: "2002/K" },
    { analyte: "CREA", value: 1.3, unit: "mg/dL", sex: "M", birthDate: "1968-11-03", collectedAt: "2026-03-02T08:15:00Z", ref: "2002/CREA" },
    { loinc: "718-7", value: 151, unit: "g/L", sex: "M", birthDate: "1968-11-03", collectedAt: "2026-03-02T08:15:00Z", ref: "2002/HGB" },
  ],
};

/** A result the instrument reported below its measuring range, and one above. */
export const scoreCensoredExample = {
  items: [
    { analyte: "TSH", value: "<0.01", unit: "m[IU]/L", ageYears: 41, ref: "3003/TSH" },
    { analyte: "ALT", value: ">1000", unit: "U/L", sex: "F", ageYears: 41, ref: "3003/ALT" },
  ],
};

/** Glucose sent in mg/dL: converted to the interval's mmol/L with glucose's molar mass before scoring. */
export const scoreUnitsExample = {
  items: [{ analyte: "GLU", value: 99, unit: "mg/dL", ageYears: 35, ref: "4004/GLU" }],
};

/** A FHIR R4 Observation: LOINC code, UCUM quantity, the patient's sex and birth date in a contained Patient. */
export const fhirObservationExample = {
  resourceType: "Observation",
  status: "final",
  contained: [{ resourceType: "Patient", id: "patient", gender: "female", birthDate: "1971-06-14" }],
  code: { coding: [{ system: "http://loinc.org", code: "2823-3", display: "Potassium [Moles/volume] in Serum or Plasma" }] },
  subject: { reference: "#patient" },
  effectiveDateTime: "2026-03-02T08:15:00Z",
  valueQuantity: { value: 4.9, unit: "mmol/L", system: "http://unitsofmeasure.org", code: "mmol/L" },
};

export const API_EXAMPLES: readonly ApiExample[] = [
  {
    id: "score-one",
    title: "Score one value",
    summary: "A potassium result of a 54-year-old woman. The answer holds one result in the order of the items.",
    method: "POST",
    path: "/api/v1/scores",
    contentType: "application/json",
    body: scoreOneExample,
  },
  {
    id: "score-batch",
    title: "Score a panel or a batch",
    summary:
      "Up to 10,000 items in one request; results come back in the same order. The exact age comes from birthDate and collectedAt; an analyte may be named by its LOINC code instead of our code.",
    method: "POST",
    path: "/api/v1/scores",
    contentType: "application/json",
    body: scoreBatchExample,
  },
  {
    id: "score-censored",
    title: "Censored values",
    summary:
      'Send a result outside the measuring range as the instrument reports it ("<0.01", ">1000"). It is scored at the censoring point, its percentile is a bound (percentileBound "below" or "above") and a caution says so.',
    method: "POST",
    path: "/api/v1/scores",
    contentType: "application/json",
    body: scoreCensoredExample,
  },
  {
    id: "score-units",
    title: "Values in another unit",
    summary:
      "Give the value's UCUM unit: it is converted to the interval's unit before scoring (mass and substance concentrations through the analyte's molar mass), and a caution says so.",
    method: "POST",
    path: "/api/v1/scores",
    contentType: "application/json",
    body: scoreUnitsExample,
  },
  {
    id: "fhir-score",
    title: "FHIR R4: score an Observation",
    summary:
      "Post an Observation (or a Bundle of them). It comes back with referenceRange and interpretation filled in, and the z-score and percentile as components.",
    method: "POST",
    path: "/api/v1/fhir/Observation/$score",
    contentType: "application/fhir+json",
    body: fhirObservationExample,
  },
  {
    id: "intervals",
    title: "The intervals in force",
    summary: "An analyte's in-force partitions, to load the LIS's own tables, each also as FHIR referenceRange elements.",
    method: "GET",
    path: "/api/v1/analytes/K/intervals",
  },
];

export function apiExample(id: string): ApiExample {
  const example = API_EXAMPLES.find((e) => e.id === id);
  if (!example) throw new Error(`No API example ${id}`);
  return example;
}

/**
 * JSON for people to read: a value goes on one line when it fits in `width` characters with its
 * indentation and key (`prefix` characters), otherwise its members go one per line. The text parses to the same value.
 */
export function readableJson(value: unknown, width = 156, indent = "", prefix = 0): string {
  const flat = inlineJson(value);
  if (value === null || typeof value !== "object" || indent.length + prefix + flat.length <= width) return flat;
  const inner = `${indent}  `;
  if (Array.isArray(value)) {
    return `[\n${value.map((v) => `${inner}${readableJson(v, width, inner)}`).join(",\n")}\n${indent}]`;
  }
  const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined);
  return `{\n${entries.map(([k, v]) => `${inner}${JSON.stringify(k)}: ${readableJson(v, width, inner, JSON.stringify(k).length + 2)}`).join(",\n")}\n${indent}}`;
}

/** JSON on one line with a space after each comma and colon between tokens (never inside strings). */
function inlineJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(inlineJson).join(", ")}]`;
  if (value !== null && typeof value === "object") {
    const entries = Object.entries(value as Record<string, unknown>).filter(([, v]) => v !== undefined);
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}: ${inlineJson(v)}`).join(", ")}}`;
  }
  return JSON.stringify(value) ?? "null";
}

/**
 * The example as a curl command for a POSIX shell. The server and the key come from the shell's
 * environment ($BELLWETHER_URL, $BELLWETHER_KEY), so a copied command holds no secret.
 */
export function curlCommand(example: ApiExample): string {
  const lines = [`curl -sS${example.method === "GET" ? "" : ` -X ${example.method}`} "$BELLWETHER_URL${example.path.replace(/\$/g, "\\$")}"`];
  lines.push(`  -H "Authorization: Bearer $BELLWETHER_KEY"`);
  if (example.body !== undefined) {
    lines.push(`  -H "Content-Type: ${example.contentType ?? "application/json"}"`);
    lines.push(`  --data-binary @- <<'JSON'\n${readableJson(example.body)}\nJSON`);
  }
  return lines.join(" \\\n");
}

/** A well-formed key that no connection holds: what a mistyped or deleted key looks like. */
export const UNKNOWN_KEY_EXAMPLE = `bwk_${"0".repeat(43)}`;

/** The API page's error examples: each with the request that gives it (sent by tests/api/api-examples.test.ts). */
export const errorExamples = {
  /** POST /api/v1/scores with UNKNOWN_KEY_EXAMPLE as the bearer key. */
  unknownKey: {
    type: "urn:bellwether:problem:unauthenticated",
    title: "Sign-in required",
    status: 401,
    detail: "The API key was not recognised. Send the whole key as `Authorization: Bearer bwk_…`, or ask your Bellwether administrator for a new one.",
    instance: "/api/v1/scores",
  },
  /** The request whose one item names an analyte Bellwether does not have. */
  itemErrorRequest: { items: [{ analyte: "XYZ", value: 1.2, ref: "5005/XYZ" }] },
  itemError: {
    ref: "5005/XYZ",
    error: { type: "urn:bellwether:problem:not_found", title: "Unknown analyte", detail: "There is no analyte with the code XYZ." },
  },
  /** POST /api/v1/fhir/Observation/$score without a key or a session. */
  fhirUnauthenticated: {
    resourceType: "OperationOutcome",
    issue: [{ severity: "error", code: "login", diagnostics: "Sign in to continue." }],
  },
};
