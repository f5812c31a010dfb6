/**
 * FHIR R4 shapes against the element rules of METHODS.md §10.3 (read from HL7's
 * structuredefinition-Observation.xml, 4.0.1): obs-3, inclusive SimpleQuantity bounds in UCUM,
 * `type` from referencerange-meaning, `appliesTo` for sex, `age` as a Range, interpretation
 * codes from v3-ObservationInterpretation, components without referenceRange. The system URIs
 * and codes below are written out from the FHIR specification, not imported from the code.
 */
import { describe, expect, it } from "vitest";
import type { Observation } from "fhir/r4";
import {
  batchResponseOf,
  interpretationOf,
  issueTypeOfStatus,
  operationOutcome,
  outcomeOfStatus,
  readScoreRequest,
  referenceRangeOf,
  scoreComponentsOf,
  scoredObservation,
  scoreItemOfObservation,
} from "@/lib/scoring/fhir";

const UCUM = "http://unitsofmeasure.org";
const MEANING = "http://terminology.hl7.org/CodeSystem/referencerange-meaning";
const INTERPRETATION = "http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation";

/** obs-3: "Must have at least a low or a high or text" (FHIR R4 Observation). */
function obs3(range: { low?: unknown; high?: unknown; text?: unknown }): boolean {
  return range.low !== undefined || range.high !== undefined || (typeof range.text === "string" && range.text.length > 0);
}

/** SimpleQuantity: a Quantity without comparator (FHIR R4 datatypes, sqty-1). */
function isSimpleUcumQuantity(q: unknown, code: string): boolean {
  const quantity = q as Record<string, unknown>;
  return quantity.system === UCUM && quantity.code === code && typeof quantity.value === "number" && !("comparator" in quantity);
}

describe("referenceRangeOf", () => {
  it("gives both limits as inclusive SimpleQuantity in the UCUM unit, type normal, and text", () => {
    // Potassium 3.5–5.1 mmol/L: METHODS.md §10.2's illustrative OBX segment.
    const range = referenceRangeOf({ low: 3.5, high: 5.1, unit: "mmol/L", decimals: 1 });
    expect(range.low).toEqual({ value: 3.5, unit: "mmol/L", system: UCUM, code: "mmol/L" });
    expect(range.high).toEqual({ value: 5.1, unit: "mmol/L", system: UCUM, code: "mmol/L" });
    expect(isSimpleUcumQuantity(range.low, "mmol/L")).toBe(true);
    expect(isSimpleUcumQuantity(range.high, "mmol/L")).toBe(true);
    expect(range.type?.coding).toEqual([{ system: MEANING, code: "normal", display: "Normal Range" }]);
    // Our own definition, not FHIR's "two standard deviations … 95.45%" (METHODS.md §10.3).
    expect(range.type?.text).toBe("Reference interval: the central 95% of healthy reference individuals (2.5th to 97.5th percentile)");
    expect(range.text).toBe(
      "3.5 to 5.1 mmol/L. Reference interval: the central 95% of healthy reference individuals (2.5th to 97.5th percentile).",
    );
    expect(range.text).not.toContain("95.45");
    expect(range.appliesTo).toBeUndefined();
    expect(range.age).toBeUndefined();
    expect(obs3(range)).toBe(true);
  });

  it("keeps the stored limits unrounded in the quantities and rounds only the text", () => {
    const range = referenceRangeOf({ low: 3.456, high: 5.149, unit: "mmol/L", decimals: 1 });
    expect(range.low?.value).toBe(3.456);
    expect(range.high?.value).toBe(5.149);
    expect(range.text).toMatch(/^3\.5 to 5\.1 mmol\/L\./);
  });

  it("leaves out the missing side of a one-sided interval and still satisfies obs-3", () => {
    const upper = referenceRangeOf({ low: null, high: 40, unit: "U/L", decimals: 0 });
    expect(upper.low).toBeUndefined();
    expect(upper.high).toEqual({ value: 40, unit: "U/L", system: UCUM, code: "U/L" });
    expect(upper.text).toMatch(/^40 U\/L or less \(upper limit only\)\./);
    expect(obs3(upper)).toBe(true);
    const lower = referenceRangeOf({ low: 10, high: null, unit: "umol/L", decimals: 0 });
    expect(lower.high).toBeUndefined();
    expect(lower.low?.code).toBe("umol/L");
    expect(lower.text).toMatch(/^10 umol\/L or more \(lower limit only\)\./);
  });

  it("names the sex in appliesTo with the SNOMED CT codes of FHIR's referencerange-appliesto value set", () => {
    const female = referenceRangeOf({ low: 120, high: 155, unit: "g/L", decimals: 0, sex: "F" });
    expect(female.appliesTo).toEqual([{ coding: [{ system: "http://snomed.info/sct", code: "248152002", display: "Female" }], text: "Female" }]);
    const male = referenceRangeOf({ low: 130, high: 170, unit: "g/L", decimals: 0, sex: "M" });
    expect(male.appliesTo?.[0].coding?.[0].code).toBe("248153007");
    expect(male.text).toMatch(/^130 to 170 g\/L; male\./);
    expect(referenceRangeOf({ low: 1, high: 2, unit: "g/L", sex: null }).appliesTo).toBeUndefined();
  });

  it("gives an age band as a Range in years (UCUM a) and says the upper age is exclusive", () => {
    const range = referenceRangeOf({ low: 40, high: 130, unit: "U/L", decimals: 0, sex: "F", ageFrom: 18, ageTo: 65 });
    expect(range.age).toEqual({
      low: { value: 18, unit: "years", system: UCUM, code: "a" },
      high: { value: 65, unit: "years", system: UCUM, code: "a" },
    });
    expect(range.text).toMatch(/^40 to 130 U\/L; female, age 18 to under 65 years\./);
    const open = referenceRangeOf({ low: 40, high: 130, unit: "U/L", ageFrom: 18, ageTo: null });
    expect(open.age).toEqual({ low: { value: 18, unit: "years", system: UCUM, code: "a" } });
    expect(open.text).toContain("age 18 years and over");
    const child = referenceRangeOf({ low: 100, high: 400, unit: "U/L", ageFrom: 0, ageTo: 18 });
    expect(child.age?.low?.value).toBe(0);
    expect(child.text).toContain("age under 18 years");
  });
});

describe("interpretationOf", () => {
  // Codes and displays from HL7 UTG v3-ObservationInterpretation 2.0.0 (METHODS.md §10.3).
  it.each([
    ["N", "Normal"],
    ["L", "Low"],
    ["H", "High"],
    ["LL", "Critical low"],
    ["HH", "Critical high"],
    ["<", "Off scale low"],
    [">", "Off scale high"],
  ] as const)("maps %s to the v3-ObservationInterpretation code %s", (flag, display) => {
    expect(interpretationOf(flag)).toEqual({ coding: [{ system: INTERPRETATION, code: flag, display }], text: display });
  });
});

describe("scoreComponentsOf", () => {
  it("gives z (UCUM 1) and percentile (UCUM %) each with its own code and no referenceRange", () => {
    const [z, p] = scoreComponentsOf({ z: 1.2345, percentile: 89.13 });
    expect(z.code.coding?.[0]).toMatchObject({ system: "urn:bellwether:codesystem:score-component", code: "z-score" });
    expect(p.code.coding?.[0]).toMatchObject({ system: "urn:bellwether:codesystem:score-component", code: "percentile" });
    expect(z.valueQuantity).toEqual({ value: 1.2345, unit: "1", system: UCUM, code: "1" });
    expect(p.valueQuantity).toEqual({ value: 89.13, unit: "%", system: UCUM, code: "%" });
    // Components do not inherit the parent's reference range (METHODS.md §10.3), nor carry one.
    expect(z.referenceRange).toBeUndefined();
    expect(p.referenceRange).toBeUndefined();
  });

  it("marks a percentile bound with the Quantity comparator", () => {
    const below = scoreComponentsOf({ z: -2.4, percentile: 0.83, percentileBound: "below" });
    expect(below.map((c) => c.valueQuantity?.comparator)).toEqual(["<", "<"]);
    const above = scoreComponentsOf({ z: 2.4, percentile: 99.17, percentileBound: "above" });
    expect(above.map((c) => c.valueQuantity?.comparator)).toEqual([">", ">"]);
  });

  it("says why there is no z or percentile for a limits-only interval", () => {
    const [z, p] = scoreComponentsOf({ z: null, percentile: null });
    expect(z.valueQuantity).toBeUndefined();
    expect(z.dataAbsentReason?.coding?.[0]).toMatchObject({
      system: "http://terminology.hl7.org/CodeSystem/data-absent-reason",
      code: "not-applicable",
    });
    expect(p.dataAbsentReason?.coding?.[0].code).toBe("not-applicable");
  });
});

function observation(extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    resourceType: "Observation",
    id: "obs-1",
    status: "final",
    contained: [{ resourceType: "Patient", id: "p", gender: "female", birthDate: "1971-06-14" }],
    code: { coding: [{ system: "http://loinc.org", code: "2823-3", display: "Potassium" }] },
    subject: { reference: "#p" },
    effectiveDateTime: "2026-03-02T08:15:00Z",
    valueQuantity: { value: 4.9, unit: "mmol/L", system: UCUM, code: "mmol/L" },
    ...extra,
  };
}

describe("scoreItemOfObservation", () => {
  it("reads the LOINC code, the value with its UCUM code, and sex and birth date from the contained Patient", () => {
    expect(scoreItemOfObservation(observation())).toEqual({
      ok: true,
      item: { loinc: "2823-3", value: 4.9, unit: "mmol/L", sex: "female", birthDate: "1971-06-14", collectedAt: "2026-03-02T08:15:00Z" },
    });
  });

  it("turns a comparator into a censored value", () => {
    const read = scoreItemOfObservation(observation({ valueQuantity: { value: 0.5, comparator: "<", system: UCUM, code: "mmol/L" } }));
    expect(read).toMatchObject({ ok: true, item: { value: "<0.5", unit: "mmol/L" } });
    const above = scoreItemOfObservation(observation({ valueQuantity: { value: 1000, comparator: ">=", system: UCUM, code: "U/L" } }));
    expect(above).toMatchObject({ ok: true, item: { value: ">=1000" } });
  });

  it("accepts Bellwether's analyte code when there is no LOINC coding, and no subject at all", () => {
    const read = scoreItemOfObservation({
      resourceType: "Observation",
      status: "final",
      code: { coding: [{ system: "urn:bellwether:codesystem:analyte", code: "K" }] },
      valueQuantity: { value: 4.2, unit: "mmol/L" },
    });
    expect(read).toEqual({ ok: true, item: { analyte: "K", value: 4.2, unit: "mmol/L" } });
  });

  it("leaves the sex out for gender other or unknown", () => {
    const read = scoreItemOfObservation(observation({ contained: [{ resourceType: "Patient", id: "p", gender: "unknown" }] }));
    expect(read).toEqual({ ok: true, item: { loinc: "2823-3", value: 4.9, unit: "mmol/L" } });
  });

  it("names every element it cannot read", () => {
    const read = scoreItemOfObservation(
      observation({
        code: { coding: [{ system: "http://snomed.info/sct", code: "88480006" }] },
        valueQuantity: { value: "4.9", system: "http://example.org/units", code: "mmol/L", comparator: "ad" },
      }),
    );
    expect(read.ok).toBe(false);
    if (read.ok) return;
    expect(read.issues.map((i) => i.expression?.[0])).toEqual([
      "Observation.code.coding",
      "Observation.valueQuantity.value",
      "Observation.valueQuantity.system",
      "Observation.valueQuantity.comparator",
    ]);
    expect(read.issues[0]).toMatchObject({ code: "required" });
    expect(read.issues[2].diagnostics).toBe(
      'Observation.valueQuantity.system must be http://unitsofmeasure.org (UCUM); got "http://example.org/units".',
    );
  });

  it("requires a valueQuantity, a full birth date, an effective time with a zone, and a contained Patient that exists", () => {
    const noValue = scoreItemOfObservation(observation({ valueQuantity: undefined, valueString: "positive" }));
    expect(noValue).toEqual({
      ok: false,
      issues: [{ code: "required", diagnostics: "Observation.valueQuantity is required: a numeric result with its UCUM unit.", expression: ["Observation.valueQuantity"] }],
    });
    const partialBirth = scoreItemOfObservation(observation({ contained: [{ resourceType: "Patient", id: "p", birthDate: "1971" }] }));
    expect(partialBirth).toMatchObject({ ok: false, issues: [{ diagnostics: "Patient.birthDate must be a full date (YYYY-MM-DD) to give the age." }] });
    const noZone = scoreItemOfObservation(observation({ effectiveDateTime: "2026-03-02T08:15:00" }));
    expect(noZone).toMatchObject({ ok: false, issues: [{ expression: ["Observation.effectiveDateTime"] }] });
    const noWhen = scoreItemOfObservation(observation({ effectiveDateTime: undefined }));
    expect(noWhen).toMatchObject({ ok: false, issues: [{ code: "required", expression: ["Observation.effectiveDateTime"] }] });
    const dangling = scoreItemOfObservation(observation({ subject: { reference: "#nobody" } }));
    expect(dangling).toMatchObject({
      ok: false,
      issues: [{ diagnostics: "Observation.subject refers to #nobody, but no contained Patient has that id." }],
    });
    expect(scoreItemOfObservation(observation({ effectiveDateTime: "2026-03-02" }))).toMatchObject({ ok: true, item: { collectedAt: "2026-03-02" } });
  });

  it("refuses another resource type", () => {
    expect(scoreItemOfObservation({ resourceType: "Patient" })).toEqual({
      ok: false,
      issues: [{ code: "invalid", diagnostics: "Expected an Observation; got Patient.", expression: ["resourceType"] }],
    });
  });
});

describe("scoredObservation", () => {
  const score = {
    z: 1.5,
    percentile: 93.32,
    flag: "N" as const,
    interval: {
      low: 3.5,
      high: 5.1,
      unit: "mmol/L",
      decimals: 1,
      version: 2,
      effectiveFrom: "2024-06-03",
      partition: { sex: "F" as const, ageFrom: 18, ageTo: 65 },
    },
    cautions: ["general"],
  };

  it("fills referenceRange, interpretation, components and the cautions as notes, keeping the rest", () => {
    const input = observation({
      referenceRange: [{ text: "the sender's own" }],
      interpretation: [{ text: "old" }],
      component: [
        { code: { text: "kept" }, valueString: "x" },
        { code: { coding: [{ system: "urn:bellwether:codesystem:score-component", code: "z-score" }] }, valueQuantity: { value: 9 } },
      ],
    }) as unknown as Observation;
    const out = scoredObservation(input, score, { general: "A general caution." });
    expect(out.id).toBe("obs-1");
    expect(out.valueQuantity).toEqual(input.valueQuantity);
    expect(out.contained).toEqual(input.contained);
    expect(out.referenceRange).toHaveLength(1);
    expect(out.referenceRange?.[0].appliesTo?.[0].text).toBe("Female");
    expect(out.referenceRange?.[0].age?.high?.value).toBe(65);
    expect(out.interpretation).toEqual([{ coding: [{ system: INTERPRETATION, code: "N", display: "Normal" }], text: "Normal" }]);
    expect(out.component?.map((c) => c.code.text ?? c.code.coding?.[0].code)).toEqual(["kept", "z-score", "Percentile"]);
    for (const c of out.component ?? []) expect(c.referenceRange).toBeUndefined();
    expect(out.note).toEqual([
      { text: "Scored by Bellwether against interval version 2, in force from 2024-06-03." },
      { text: "A general caution." },
    ]);
    // The input is not changed.
    expect(input.referenceRange).toEqual([{ text: "the sender's own" }]);
  });
});

describe("OperationOutcome", () => {
  it("builds issues with severity, code, diagnostics and expression", () => {
    expect(operationOutcome([{ code: "invalid", diagnostics: "Bad.", expression: ["Observation.code"] }])).toEqual({
      resourceType: "OperationOutcome",
      issue: [{ severity: "error", code: "invalid", diagnostics: "Bad.", expression: ["Observation.code"] }],
    });
    expect(outcomeOfStatus(503, "Down.")).toEqual({
      resourceType: "OperationOutcome",
      issue: [{ severity: "fatal", code: "transient", diagnostics: "Down." }],
    });
  });

  it("maps HTTP statuses to the issue-type codes of FHIR R4's IssueType value set", () => {
    expect([400, 401, 403, 404, 405, 409, 413, 415, 422, 429, 500, 503].map(issueTypeOfStatus)).toEqual([
      "structure",
      "login",
      "forbidden",
      "not-found",
      "not-supported",
      "conflict",
      "too-long",
      "not-supported",
      "invalid",
      "throttled",
      "exception",
      "transient",
    ]);
  });
});

describe("readScoreRequest and batchResponseOf", () => {
  it("reads an Observation or a batch or collection Bundle, refusing the rest", () => {
    expect(readScoreRequest(observation())).toMatchObject({ kind: "observation" });
    expect(
      readScoreRequest({ resourceType: "Bundle", type: "batch", entry: [{ fullUrl: "urn:uuid:1", resource: observation() }, { request: {} }] }),
    ).toEqual({ kind: "bundle", entries: [{ fullUrl: "urn:uuid:1", resource: observation() }, { resource: undefined }] });
    expect(readScoreRequest({ resourceType: "Bundle", type: "transaction", entry: [] })).toEqual({
      error: {
        code: "not-supported",
        diagnostics: 'Bundle.type must be batch or collection (each Observation is scored on its own); got "transaction".',
        expression: ["Bundle.type"],
      },
    });
    expect(readScoreRequest({ resourceType: "Bundle", type: "collection" })).toMatchObject({ error: { diagnostics: "The Bundle has no entries to score." } });
    expect(readScoreRequest({ resourceType: "Patient" })).toMatchObject({ error: { diagnostics: "Send an Observation or a Bundle of Observations; got Patient." } });
    expect(readScoreRequest([])).toMatchObject({ error: { expression: ["resourceType"] } });
  });

  it("answers a batch-response with each entry's status and its Observation or outcome, in order", () => {
    const ok = observation() as unknown as Observation;
    const bundle = batchResponseOf(
      [
        { fullUrl: "urn:uuid:1", status: 200, observation: ok },
        { status: 422, outcome: outcomeOfStatus(422, "No.") },
      ],
      "2026-03-02T08:15:00.000Z",
    );
    expect(bundle).toEqual({
      resourceType: "Bundle",
      type: "batch-response",
      timestamp: "2026-03-02T08:15:00.000Z",
      entry: [
        { fullUrl: "urn:uuid:1", resource: ok, response: { status: "200 OK" } },
        {
          response: {
            status: "422 Unprocessable Entity",
            outcome: { resourceType: "OperationOutcome", issue: [{ severity: "error", code: "invalid", diagnostics: "No." }] },
          },
        },
      ],
    });
  });
});
