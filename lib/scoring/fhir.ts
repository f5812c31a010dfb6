/**
 * FHIR R4 shapes of Bellwether's scores: a partition's reference interval as
 * Observation.referenceRange, a flag as Observation.interpretation, z and percentile as
 * components, an incoming Observation read into a score item, and the OperationOutcome every
 * FHIR error answers with. Pure: no I/O, no framework; the route does the rest.
 *
 * @see HL7 FHIR R4 (4.0.1) Observation, structuredefinition-Observation.xml (METHODS.md §10.3):
 * obs-3, inclusive SimpleQuantity bounds, referencerange-meaning, appliesTo, age Range;
 * v3-ObservationInterpretation; OperationOutcome; Bundle (batch-response).
 */
import type {
  Bundle,
  BundleEntry,
  CodeableConcept,
  Coding,
  Observation,
  ObservationComponent,
  ObservationReferenceRange,
  OperationOutcome,
  OperationOutcomeIssue,
  Patient,
  Quantity,
} from "fhir/r4";
import type { Flag } from "./flag";

export const UCUM_SYSTEM = "http://unitsofmeasure.org";
export const LOINC_SYSTEM = "http://loinc.org";
export const REFERENCE_RANGE_MEANING_SYSTEM = "http://terminology.hl7.org/CodeSystem/referencerange-meaning";
export const INTERPRETATION_SYSTEM = "http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation";
export const SNOMED_SYSTEM = "http://snomed.info/sct";
export const DATA_ABSENT_REASON_SYSTEM = "http://terminology.hl7.org/CodeSystem/data-absent-reason";
/** Bellwether's own analyte codes (e.g. K), for an analyte that has no LOINC code. */
export const ANALYTE_CODE_SYSTEM = "urn:bellwether:codesystem:analyte";
/** Bellwether's codes for the z-score and percentile components. */
export const SCORE_COMPONENT_SYSTEM = "urn:bellwether:codesystem:score-component";

/** Our definition of a reference interval, stated where FHIR's `normal` would say "2 SD, 95.45%". */
export const REFERENCE_INTERVAL_DEFINITION =
  "Reference interval: the central 95% of healthy reference individuals (2.5th to 97.5th percentile)";

/** The media type of FHIR's JSON format. */
export const FHIR_JSON = "application/fhir+json";

/** A partition's interval as the intervals route and a score result give it (ages in years). */
export interface ReferenceRangeInput {
  low: number | null;
  high: number | null;
  /** UCUM code of the limits. */
  unit: string;
  /** Decimals for the human-readable text; the quantities carry the stored limits unrounded. */
  decimals?: number;
  sex?: "F" | "M" | null;
  /** Years, inclusive. */
  ageFrom?: number | null;
  /** Years, exclusive (the partition's band is half-open). */
  ageTo?: number | null;
  /** LMS age curves: the exact age in years the limits belong to (the Range's low = high). */
  atAge?: number | null;
  /** LMS age curves asked without an age: the ages they cover, for a text-only element. */
  curves?: { ageMin: number; ageMax: number } | null;
}

function ucumQuantity(value: number, code: string, unit: string = code): Quantity {
  return { value, unit, system: UCUM_SYSTEM, code };
}

const SEX_APPLIES_TO: Record<"F" | "M", CodeableConcept> = {
  // SNOMED CT codes listed in FHIR R4's referencerange-appliesto value set (example binding).
  F: { coding: [{ system: SNOMED_SYSTEM, code: "248152002", display: "Female" }], text: "Female" },
  M: { coding: [{ system: SNOMED_SYSTEM, code: "248153007", display: "Male" }], text: "Male" },
};

function ageText(from: number | null, to: number | null): string | null {
  if (from === null && to === null) return null;
  if (to === null) return `age ${from} years and over`;
  if (from === null || from === 0) return `age under ${to} years`;
  return `age ${from} to under ${to} years`;
}

/**
 * One Observation.referenceRange element for a partition: `low` and `high` as SimpleQuantity in
 * the interval's UCUM unit (inclusive, as FHIR defines them and as Bellwether flags), `type`
 * normal from referencerange-meaning with our own definition as its text, `appliesTo` the sex
 * of a sex partition, `age` a Range in years (UCUM `a`) for an age band, and `text` spelling it
 * out. Satisfies obs-3 (a low or a high or text) always, since it carries text.
 *
 * FHIR's Range is inclusive at both ends while a partition's age band is half-open [from, to):
 * the text says "to under", the boundary age belonging to the next band.
 * @example
 * referenceRangeOf({ low: 3.5, high: 5.1, unit: "mmol/L", decimals: 1 }).low
 * // → { value: 3.5, unit: "mmol/L", system: "http://unitsofmeasure.org", code: "mmol/L" }
 */
export function referenceRangeOf(input: ReferenceRangeInput): ObservationReferenceRange {
  const range: ObservationReferenceRange = {};
  if (input.low !== null) range.low = ucumQuantity(input.low, input.unit);
  if (input.high !== null) range.high = ucumQuantity(input.high, input.unit);
  range.type = {
    coding: [{ system: REFERENCE_RANGE_MEANING_SYSTEM, code: "normal", display: "Normal Range" }],
    text: REFERENCE_INTERVAL_DEFINITION,
  };
  const sex = input.sex ?? null;
  if (sex !== null) range.appliesTo = [SEX_APPLIES_TO[sex]];
  const atAge = input.atAge ?? null;
  const curves = input.curves ?? null;
  // LMS curves: the exact age (a Range of one point) or, asked without one, the ages they cover
  // (both inclusive, as the curves are).
  const ageFrom = atAge ?? curves?.ageMin ?? input.ageFrom ?? null;
  const ageTo = atAge ?? curves?.ageMax ?? input.ageTo ?? null;
  if (ageFrom !== null || ageTo !== null) {
    range.age = {};
    if (ageFrom !== null) range.age.low = ucumQuantity(ageFrom, "a", "years");
    if (ageTo !== null) range.age.high = ucumQuantity(ageTo, "a", "years");
  }
  const f = (v: number) => (input.decimals === undefined ? String(v) : v.toFixed(input.decimals));
  const limits =
    input.low !== null && input.high !== null
      ? `${f(input.low)} to ${f(input.high)} ${input.unit}`
      : input.low !== null
        ? `${f(input.low)} ${input.unit} or more (lower limit only)`
        : input.high !== null
          ? `${f(input.high)} ${input.unit} or less (upper limit only)`
          : curves !== null
            ? "Limits continuous in age (LMS age curves): the 2.5th and 97.5th centiles at the patient's exact age"
            : "No limits at this age";
  const ageWords =
    atAge !== null
      ? `at the exact age of ${Math.round(atAge * 100) / 100} years (LMS age curves)`
      : curves !== null
        ? `age ${curves.ageMin} to ${curves.ageMax} years`
        : ageText(ageFrom, ageTo);
  const who = [sex === "F" ? "female" : sex === "M" ? "male" : null, ageWords].filter((s) => s !== null);
  range.text = `${limits}${who.length > 0 ? `; ${who.join(", ")}` : ""}. ${REFERENCE_INTERVAL_DEFINITION}.`;
  return range;
}

const INTERPRETATION_DISPLAY: Record<Flag, string> = {
  N: "Normal",
  L: "Low",
  H: "High",
  LL: "Critical low",
  HH: "Critical high",
  "<": "Off scale low",
  ">": "Off scale high",
};

/**
 * Observation.interpretation for a flag: the same code in HL7's v3-ObservationInterpretation
 * code system (Bellwether's flags are a subset of it: N, L, H, LL, HH, <, >).
 * @example
 * interpretationOf("H") // → { coding: [{ system: INTERPRETATION_SYSTEM, code: "H", display: "High" }], text: "High" }
 */
export function interpretationOf(flag: Flag): CodeableConcept {
  const display = INTERPRETATION_DISPLAY[flag];
  return { coding: [{ system: INTERPRETATION_SYSTEM, code: flag, display }], text: display };
}

export interface ScoreComponentsInput {
  z: number | null;
  percentile: number | null;
  /** The percentile (and so z) is only a bound: "below" → `<`, "above" → `>`. */
  percentileBound?: "below" | "above";
}

const Z_CODE: CodeableConcept = {
  coding: [{ system: SCORE_COMPONENT_SYSTEM, code: "z-score", display: "z-score among healthy reference individuals" }],
  text: "z-score",
};
const PERCENTILE_CODE: CodeableConcept = {
  coding: [{ system: SCORE_COMPONENT_SYSTEM, code: "percentile", display: "Percentile among healthy reference individuals" }],
  text: "Percentile",
};
const NOT_APPLICABLE: CodeableConcept = {
  coding: [{ system: DATA_ABSENT_REASON_SYSTEM, code: "not-applicable", display: "Not Applicable" }],
  text: "This interval has limits only: no z-score or percentile",
};

/**
 * z and percentile as two Observation.component elements, each with its own code. z is
 * dimensionless (UCUM `1`), the percentile in UCUM `%` (0–100). A bound carries the Quantity
 * comparator. Without a z or percentile (a limits-only interval) the component says why in
 * dataAbsentReason. Components carry no referenceRange: they do not inherit the parent's.
 */
export function scoreComponentsOf(input: ScoreComponentsInput): ObservationComponent[] {
  const comparator = input.percentileBound === "below" ? "<" : input.percentileBound === "above" ? ">" : undefined;
  const component = (code: CodeableConcept, value: number | null, ucum: string): ObservationComponent => {
    if (value === null) return { code, dataAbsentReason: NOT_APPLICABLE };
    const quantity = ucumQuantity(value, ucum);
    if (comparator) quantity.comparator = comparator;
    return { code, valueQuantity: quantity };
  };
  return [component(Z_CODE, input.z, "1"), component(PERCENTILE_CODE, input.percentile, "%")];
}

// ——— Errors ———

export type IssueType = OperationOutcomeIssue["code"];

export interface OutcomeIssueInput {
  severity?: OperationOutcomeIssue["severity"];
  code: IssueType;
  diagnostics: string;
  /** FHIRPath expressions of the elements concerned, e.g. "Observation.valueQuantity.system". */
  expression?: string[];
}

/** An OperationOutcome with the issues given (severity "error" unless said otherwise). */
export function operationOutcome(issues: readonly OutcomeIssueInput[]): OperationOutcome {
  return {
    resourceType: "OperationOutcome",
    issue: issues.map((i) => {
      const issue: OperationOutcomeIssue = { severity: i.severity ?? "error", code: i.code, diagnostics: i.diagnostics };
      if (i.expression && i.expression.length > 0) issue.expression = [...i.expression];
      return issue;
    }),
  };
}

/** The OperationOutcome issue type that matches an HTTP error status. */
export function issueTypeOfStatus(status: number): IssueType {
  switch (status) {
    case 400:
      return "structure";
    case 401:
      return "login";
    case 403:
      return "forbidden";
    case 404:
      return "not-found";
    case 405:
      return "not-supported";
    case 409:
      return "conflict";
    case 413:
      return "too-long";
    case 415:
      return "not-supported";
    case 429:
      return "throttled";
    case 503:
      return "transient";
    default:
      return status >= 500 ? "exception" : "invalid";
  }
}

/** An OperationOutcome for one error answered with an HTTP status. */
export function outcomeOfStatus(status: number, diagnostics: string, expression?: string[]): OperationOutcome {
  return operationOutcome([{ severity: status >= 500 ? "fatal" : "error", code: issueTypeOfStatus(status), diagnostics, expression }]);
}

// ——— Reading an Observation ———

/** A score item (POST /api/v1/scores' item contract) read from an Observation. */
export interface ObservationScoreItem {
  loinc?: string;
  analyte?: string;
  value: number | string;
  unit?: string;
  sex?: "female" | "male";
  birthDate?: string;
  collectedAt?: string;
}

export type ObservationReading = { ok: true; item: ObservationScoreItem } | { ok: false; issues: OutcomeIssueInput[] };

const FULL_DATE = /^\d{4}-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/;
const DATE_TIME = /^\d{4}-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])T([01]\d|2[0-3]):[0-5]\d:([0-5]\d|60)(\.\d+)?(Z|[+-]((0\d|1[0-3]):[0-5]\d|14:00))$/;

function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

function codingsOf(concept: unknown): Coding[] {
  if (!isRecord(concept) || !Array.isArray(concept.coding)) return [];
  return concept.coding.filter(isRecord) as Coding[];
}

function invalid(diagnostics: string, expression: string): OutcomeIssueInput {
  return { code: "invalid", diagnostics, expression: [expression] };
}

function readCode(obs: Record<string, unknown>, issues: OutcomeIssueInput[]): Pick<ObservationScoreItem, "loinc" | "analyte"> {
  const codings = codingsOf(obs.code);
  const loinc = codings.find((c) => c.system === LOINC_SYSTEM && typeof c.code === "string");
  if (loinc) return { loinc: loinc.code };
  const ours = codings.find((c) => c.system === ANALYTE_CODE_SYSTEM && typeof c.code === "string");
  if (ours) return { analyte: ours.code };
  issues.push({
    code: "required",
    diagnostics: `Observation.code needs a coding with system ${LOINC_SYSTEM} (a LOINC code such as 2823-3), or ${ANALYTE_CODE_SYSTEM} with Bellwether's analyte code.`,
    expression: ["Observation.code.coding"],
  });
  return {};
}

function readValue(obs: Record<string, unknown>, issues: OutcomeIssueInput[]): Pick<ObservationScoreItem, "value" | "unit"> | null {
  const q = obs.valueQuantity;
  if (!isRecord(q)) {
    issues.push({
      code: "required",
      diagnostics: "Observation.valueQuantity is required: a numeric result with its UCUM unit.",
      expression: ["Observation.valueQuantity"],
    });
    return null;
  }
  const before = issues.length;
  if (typeof q.value !== "number" || !Number.isFinite(q.value)) {
    issues.push(invalid("Observation.valueQuantity.value must be a number.", "Observation.valueQuantity.value"));
  }
  if (q.system !== undefined && q.system !== UCUM_SYSTEM) {
    issues.push(invalid(`Observation.valueQuantity.system must be ${UCUM_SYSTEM} (UCUM); got ${JSON.stringify(q.system)}.`, "Observation.valueQuantity.system"));
  }
  const code = typeof q.code === "string" && q.code.length > 0 ? q.code : undefined;
  const unit = code ?? (typeof q.unit === "string" && q.unit.length > 0 ? q.unit : undefined);
  if (q.system === UCUM_SYSTEM && code === undefined) {
    issues.push(invalid("Observation.valueQuantity.code must give the UCUM code of the unit.", "Observation.valueQuantity.code"));
  }
  const comparator = q.comparator;
  const censoring = comparator === "<" || comparator === "<=" || comparator === ">" || comparator === ">=";
  if (comparator !== undefined && !censoring) {
    issues.push(invalid(`Observation.valueQuantity.comparator ${JSON.stringify(comparator)} cannot be scored; use <, <=, > or >=.`, "Observation.valueQuantity.comparator"));
  }
  if (issues.length > before) return null;
  const value = q.value as number;
  return { value: censoring ? `${comparator}${value}` : value, ...(unit !== undefined ? { unit } : {}) };
}

function effectiveOf(obs: Record<string, unknown>): { value: unknown; path: string } | null {
  if (obs.effectiveDateTime !== undefined) return { value: obs.effectiveDateTime, path: "Observation.effectiveDateTime" };
  if (obs.effectiveInstant !== undefined) return { value: obs.effectiveInstant, path: "Observation.effectiveInstant" };
  return null;
}

function readSubject(obs: Record<string, unknown>, issues: OutcomeIssueInput[]): Pick<ObservationScoreItem, "sex" | "birthDate" | "collectedAt"> {
  const subject = obs.subject;
  if (!isRecord(subject) || typeof subject.reference !== "string") return {};
  const reference = subject.reference;
  if (!reference.startsWith("#")) return {};
  const contained = Array.isArray(obs.contained) ? obs.contained.filter(isRecord) : [];
  const patient = contained.find((r) => r.resourceType === "Patient" && r.id === reference.slice(1)) as Partial<Patient> | undefined;
  if (!patient) {
    issues.push(invalid(`Observation.subject refers to ${reference}, but no contained Patient has that id.`, "Observation.subject.reference"));
    return {};
  }
  const out: Pick<ObservationScoreItem, "sex" | "birthDate" | "collectedAt"> = {};
  if (patient.gender === "female" || patient.gender === "male") out.sex = patient.gender;
  if (patient.birthDate !== undefined) {
    if (typeof patient.birthDate !== "string" || !FULL_DATE.test(patient.birthDate)) {
      issues.push(invalid("Patient.birthDate must be a full date (YYYY-MM-DD) to give the age.", "Observation.contained.birthDate"));
      return out;
    }
    const effective = effectiveOf(obs);
    if (!effective) {
      issues.push({
        code: "required",
        diagnostics: "Observation.effectiveDateTime is required with Patient.birthDate: the age is taken at collection.",
        expression: ["Observation.effectiveDateTime"],
      });
      return out;
    }
    const when = effective.value;
    if (typeof when !== "string" || !(FULL_DATE.test(when) || DATE_TIME.test(when))) {
      issues.push(invalid(`${effective.path} must be a full date or a date-time with its time zone to give the age.`, effective.path));
      return out;
    }
    out.birthDate = patient.birthDate;
    out.collectedAt = when;
  }
  return out;
}

/**
 * An Observation → a score item: the LOINC code (or Bellwether's own analyte code), the
 * valueQuantity (UCUM code, else its unit; comparator `<`/`<=`/`>`/`>=` → a censored value such
 * as "<0.5"), and from the contained Patient that `subject` points at, gender and birthDate with
 * the Observation's effectiveDateTime. Anything that cannot be read comes back as issues naming
 * the element; the analyte, unit and partition themselves are checked by the score service.
 */
export function scoreItemOfObservation(resource: unknown): ObservationReading {
  if (!isRecord(resource) || resource.resourceType !== "Observation") {
    const got = isRecord(resource) && typeof resource.resourceType === "string" ? resource.resourceType : "something else";
    return { ok: false, issues: [invalid(`Expected an Observation; got ${got}.`, "resourceType")] };
  }
  const issues: OutcomeIssueInput[] = [];
  const code = readCode(resource, issues);
  const value = readValue(resource, issues);
  const subject = readSubject(resource, issues);
  if (issues.length > 0 || value === null) return { ok: false, issues };
  return { ok: true, item: { ...code, ...value, ...subject } };
}

// ——— The answer ———

/** What the score service answers for one item, as much as the FHIR shapes need. */
export interface ScoredValue {
  z: number | null;
  percentile: number | null;
  percentileBound?: "below" | "above";
  flag: Flag;
  /** For LMS curves, `ageYears` is the exact age whose limits `interval` holds. */
  model?: { kind: string; ageYears?: number };
  interval: {
    low: number | null;
    high: number | null;
    unit: string;
    decimals: number;
    version: number;
    effectiveFrom: string | null;
    partition: { sex?: "F" | "M"; ageFrom?: number; ageTo?: number };
  };
  cautions: readonly string[];
}

/**
 * The Observation as sent, with Bellwether's answer filled in: referenceRange (the partition
 * that applied, in the interval's unit), interpretation (the flag), the z-score and percentile
 * components (replacing any of ours already there, other components kept), and each caution as
 * a note in full sentences. Everything else is returned untouched.
 */
export function scoredObservation(observation: Observation, score: ScoredValue, cautionTexts: Readonly<Record<string, string>>): Observation {
  const { interval } = score;
  const others = (observation.component ?? []).filter((c) => !codingsOf(c.code).some((k) => k.system === SCORE_COMPONENT_SYSTEM));
  const version = `Scored by Bellwether against interval version ${interval.version}${interval.effectiveFrom ? `, in force from ${interval.effectiveFrom}` : ""}.`;
  return {
    ...observation,
    referenceRange: [
      referenceRangeOf({
        low: interval.low,
        high: interval.high,
        unit: interval.unit,
        decimals: interval.decimals,
        sex: interval.partition.sex ?? null,
        ageFrom: interval.partition.ageFrom ?? null,
        ageTo: interval.partition.ageTo ?? null,
        atAge: score.model?.kind === "lms" ? (score.model.ageYears ?? null) : null,
      }),
    ],
    interpretation: [interpretationOf(score.flag)],
    component: [...others, ...scoreComponentsOf(score)],
    note: [...(observation.note ?? []), { text: version }, ...score.cautions.map((c) => ({ text: cautionTexts[c] ?? c }))],
  };
}

// ——— Requests and Bundles ———

export type FhirScoreRequest =
  | { kind: "observation"; observation: unknown }
  | { kind: "bundle"; entries: { fullUrl?: string; resource: unknown }[] };

/** Bundle types whose entries are scored: each entry on its own, so never `transaction`. */
export const ACCEPTED_BUNDLE_TYPES = ["batch", "collection"] as const;

/**
 * The body of $score: an Observation, or a Bundle (batch or collection) of them. Throws
 * nothing; a body that is neither answers the issue to return.
 */
export function readScoreRequest(body: unknown): FhirScoreRequest | { error: OutcomeIssueInput } {
  if (!isRecord(body) || typeof body.resourceType !== "string") {
    return { error: invalid("Send a FHIR resource: an Observation, or a Bundle of Observations.", "resourceType") };
  }
  if (body.resourceType === "Observation") return { kind: "observation", observation: body };
  if (body.resourceType !== "Bundle") {
    return { error: invalid(`Send an Observation or a Bundle of Observations; got ${body.resourceType}.`, "resourceType") };
  }
  if (!(ACCEPTED_BUNDLE_TYPES as readonly unknown[]).includes(body.type)) {
    return {
      error: {
        code: "not-supported",
        diagnostics: `Bundle.type must be batch or collection (each Observation is scored on its own); got ${JSON.stringify(body.type ?? null)}.`,
        expression: ["Bundle.type"],
      },
    };
  }
  const raw = body.entry === undefined ? [] : body.entry;
  if (!Array.isArray(raw)) return { error: invalid("Bundle.entry must be a list.", "Bundle.entry") };
  if (raw.length === 0) return { error: { code: "required", diagnostics: "The Bundle has no entries to score.", expression: ["Bundle.entry"] } };
  return {
    kind: "bundle",
    entries: raw.map((e) => {
      const entry = isRecord(e) ? e : {};
      return { ...(typeof entry.fullUrl === "string" ? { fullUrl: entry.fullUrl } : {}), resource: entry.resource };
    }),
  };
}

const STATUS_TEXT: Record<number, string> = {
  200: "OK",
  400: "Bad Request",
  404: "Not Found",
  409: "Conflict",
  422: "Unprocessable Entity",
  500: "Internal Server Error",
  503: "Service Unavailable",
};

export type EntryOutcome =
  | { fullUrl?: string; status: 200; observation: Observation }
  | { fullUrl?: string; status: number; outcome: OperationOutcome };

/**
 * The answer to a Bundle: a `batch-response` Bundle with one entry per entry sent, in order,
 * each with `response.status` and either the scored Observation or, in `response.outcome`, the
 * OperationOutcome of its failure. batch-response rather than collection because only response
 * Bundles may carry entry.response (FHIR R4 Bundle, bdl-4/bdl-5 rules): each Observation is
 * scored on its own, one failure does not fail the others, and the caller needs each status.
 */
export function batchResponseOf(entries: readonly EntryOutcome[], timestamp: string): Bundle {
  return {
    resourceType: "Bundle",
    type: "batch-response",
    timestamp,
    entry: entries.map((e): BundleEntry => {
      const status = `${e.status} ${STATUS_TEXT[e.status] ?? ""}`.trim();
      const base = e.fullUrl !== undefined ? { fullUrl: e.fullUrl } : {};
      if ("observation" in e) return { ...base, resource: e.observation, response: { status } };
      return { ...base, response: { status, outcome: e.outcome } };
    }),
  };
}
