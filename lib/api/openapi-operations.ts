/**
 * Every operation of the REST API, as the OpenAPI document lists it: the schemas are the ones the
 * route handlers parse with (imported from the feature's lib module, never copied), the access is
 * the handler's permission, and the errors are those the handler can answer beyond what its
 * access and inputs imply (lib/api/openapi.ts adds 401/403/422/… from those).
 * tests/lib/openapi.test.ts fails when a route file under app/api/v1 has a method missing here.
 */
import { z } from "zod";
import type { oas31 } from "zod-openapi";
import { adoptionCheckIdParams, createAdoptionCheckBody, listAdoptionChecksQuery, secondSetBody } from "@/lib/adoption/input";
import { analyteCodeParams, createAnalyteBody, updateAnalyteBody } from "@/lib/analytes/input";
import type { Permission } from "@/lib/auth/roles";
import { outboxQuery } from "@/lib/mail/outbox-query";
import {
  createdLisConnectionSchema,
  createLisConnectionBody,
  DEFAULT_RATE_PER_MINUTE,
  lisConnectionListSchema,
  lisConnectionParams,
  lisConnectionSchema,
  lisUsageSchema,
  updateLisConnectionBody,
} from "@/lib/lis/input";
import { analyteIntervalsSchema, intervalsParams, intervalsQuery, MAX_FHIR_BODY_BYTES, MAX_SCORE_BODY_BYTES, MAX_SCORE_ITEMS, scoreRequestSchema, scoreResponseSchema } from "@/lib/scores/schemas";
import { lookupQuery, partitionQuery } from "@/lib/studies/chart-data";
import { donorResultsQuery } from "@/lib/studies/donor-results-query";
import { estimateIdParams, estimateRequestDocBody } from "@/lib/studies/estimate-input";
import { createStudyBody, studyIdParams, uploadIdParams } from "@/lib/studies/input";
import { partitionAssessmentBody, partitionPlanBody } from "@/lib/studies/partition-input";
import { decisionIdParams, exclusionIdParams, exclusionsBody, listAllQuery, outlierDecisionBody, screenBody } from "@/lib/studies/screening-input";
import { templateQuery, uploadFormSchema } from "@/lib/studies/upload-form";
import {
  createVersionBody,
  listVersionsQuery,
  returnVersionBody,
  reviewVersionBody,
  signVersionBody,
  updateVersionBody,
  userIdParams,
  versionIdParams,
  withdrawVersionBody,
} from "@/lib/versions/input";
import { fhirObservationExample, scoreBatchExample, scoreCensoredExample, scoreOneExample, scoreUnitsExample } from "./examples";

export type ErrorStatus = 400 | 401 | 403 | 404 | 405 | 409 | 413 | 415 | 422 | 429 | 503;
export type HttpMethod = "get" | "post" | "put" | "patch" | "delete";

type ZodObjectSchema = z.ZodType<unknown, Record<string, unknown>>;

export interface SuccessContent {
  type: string;
  schema: z.ZodType | oas31.SchemaObject;
  example?: unknown;
}

export interface ApiOperation {
  method: HttpMethod;
  /** The OpenAPI path: app/api/v1's folders with [id] written {id}. */
  path: string;
  operationId: string;
  tag: string;
  summary: string;
  description?: string;
  /** The handler's permission, and whether an LIS key is accepted (`lisKey: true` in apiRoute). */
  access: "public" | { permission: Permission; lisKey?: boolean };
  params?: ZodObjectSchema;
  query?: ZodObjectSchema;
  /** A JSON body, parsed with this schema. */
  body?: z.ZodType;
  bodyTypes?: string[];
  bodyExamples?: Record<string, { summary: string; value: unknown }>;
  /** A multipart/form-data body, documented by this schema. */
  multipart?: ZodObjectSchema;
  /** An operation that only refuses (405): its answer is the refusal alone. */
  notAllowed?: string;
  success: {
    status: 200 | 201;
    description: string;
    /** The JSON answer's schema; without one (and without `content`), a described object. */
    schema?: z.ZodType | oas31.SchemaObject;
    content?: SuccessContent[];
    headers?: ZodObjectSchema;
  };
  errors?: ErrorStatus[];
  /** Errors come back as FHIR OperationOutcome rather than problem+json. */
  fhirErrors?: boolean;
}

/** A JSON object described in words, for answers that have no schema of their own. */
const described = (description: string) => z.looseObject({}).meta({ description });
const binary = (type: string, description: string): SuccessContent[] => [{ type, schema: { type: "string", format: "binary", description } }];
const location = z.object({ Location: z.string().meta({ description: "The new resource's address" }) });
const XLSX = "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet";

const fhirResource = z
  .looseObject({ resourceType: z.enum(["Observation", "Bundle"]) })
  .meta({ id: "FhirObservationOrBundle", description: "A FHIR R4 Observation, or a Bundle whose entries are Observations" });

const SCORES: ApiOperation[] = [
  {
    method: "post",
    path: "/api/v1/scores",
    operationId: "createScores",
    tag: "Scoring",
    summary: "Score patient values",
    description: [
      `Scores 1 to ${MAX_SCORE_ITEMS.toLocaleString("en")} items against the intervals in force; each result is in the place of its item, and one bad item is an \`{error}\` in its place without failing the batch.`,
      `${(MAX_SCORE_ITEMS + 1).toLocaleString("en")} items, or a body over ${MAX_SCORE_BODY_BYTES / 1024 / 1024} MiB (${MAX_SCORE_BODY_BYTES.toLocaleString("en")} bytes), is refused whole with 413.`,
      "Each caution code in the results is explained once, in a full sentence, in `cautionTexts`.",
    ].join(" "),
    access: { permission: "scores:create", lisKey: true },
    body: scoreRequestSchema,
    bodyExamples: {
      one: { summary: "One value", value: scoreOneExample },
      panel: { summary: "A panel of one patient, exact age, a LOINC code, a converted unit", value: scoreBatchExample },
      censored: { summary: "Censored values", value: scoreCensoredExample },
      units: { summary: "A value in another unit", value: scoreUnitsExample },
    },
    success: { status: 200, description: "One result (or item error) per item, in order", schema: scoreResponseSchema },
  },
  {
    method: "post",
    path: "/api/v1/fhir/Observation/$score",
    operationId: "scoreFhirObservation",
    tag: "FHIR",
    summary: "Score FHIR R4 Observations",
    description: `Accepts an Observation or a Bundle of them (LOINC code, valueQuantity with a UCUM unit, a comparator \`<\`/\`>\` for a censored value, the subject's gender and birthDate in a contained Patient with the Observation's effectiveDateTime) and returns them with referenceRange and interpretation filled in, and the z-score and percentile as components. Every error, authentication included, is an OperationOutcome. At most ${MAX_SCORE_ITEMS.toLocaleString("en")} Observations and ${MAX_FHIR_BODY_BYTES / 1024 / 1024} MiB per request.`,
    access: { permission: "scores:create", lisKey: true },
    body: fhirResource,
    bodyTypes: ["application/fhir+json", "application/json"],
    bodyExamples: { observation: { summary: "A potassium Observation", value: fhirObservationExample } },
    success: {
      status: 200,
      description:
        "The Observation with referenceRange, interpretation and components; for a Bundle, a batch-response Bundle with each entry's status in order (an entry that could not be scored carries its OperationOutcome)",
      content: [{ type: "application/fhir+json", schema: fhirResource }],
    },
    fhirErrors: true,
    errors: [404],
  },
  ...(["get", "put", "patch", "delete"] as const).map(
    (method): ApiOperation => ({
      method,
      path: "/api/v1/fhir/Observation/$score",
      operationId: `scoreFhirObservation${method[0].toUpperCase()}${method.slice(1)}NotAllowed`,
      tag: "FHIR",
      summary: "Not allowed: $score is run with POST",
      access: "public",
      notAllowed: "405 with an OperationOutcome saying to use POST, and an Allow: POST header",
      success: { status: 200, description: "Never: this method is always refused" },
      fhirErrors: true,
    }),
  ),
];

const ANALYTES: ApiOperation[] = [
  {
    method: "get",
    path: "/api/v1/analytes",
    operationId: "listAnalytes",
    tag: "Analytes",
    summary: "The analyte catalogue",
    access: { permission: "intervals:read", lisKey: true },
    success: {
      status: 200,
      description: "`{analytes: [{id, code, name, unit, decimals, loinc, specimen, reviewMonths, criticalLow, criticalHigh, molarMass, molarMassSource, createdAt, createdBy, updatedAt, updatedBy}]}`",
      schema: described("{analytes: [analyte]}"),
    },
  },
  {
    method: "post",
    path: "/api/v1/analytes",
    operationId: "createAnalyte",
    tag: "Analytes",
    summary: "Add an analyte",
    access: { permission: "analytes:write" },
    body: createAnalyteBody,
    success: { status: 201, description: "The analyte as stored", schema: described("The analyte, as GET /api/v1/analytes/{code} answers it"), headers: location },
    errors: [409],
  },
  {
    method: "get",
    path: "/api/v1/analytes/{code}",
    operationId: "getAnalyte",
    tag: "Analytes",
    summary: "One analyte",
    access: { permission: "intervals:read", lisKey: true },
    params: analyteCodeParams,
    success: { status: 200, description: "The analyte", schema: described("The analyte with every catalogue field") },
    errors: [404],
  },
  {
    method: "patch",
    path: "/api/v1/analytes/{code}",
    operationId: "updateAnalyte",
    tag: "Analytes",
    summary: "Change an analyte",
    description: "A partial change; null clears an optional field. The code never changes; the unit and decimals are locked once a version leaves draft (409).",
    access: { permission: "analytes:write" },
    params: analyteCodeParams,
    body: updateAnalyteBody,
    success: { status: 200, description: "The analyte after the change", schema: described("The analyte with every catalogue field") },
    errors: [404, 409],
  },
  {
    method: "get",
    path: "/api/v1/analytes/{code}/intervals",
    operationId: "getAnalyteIntervals",
    tag: "Analytes",
    summary: "The intervals in force for an analyte",
    description:
      "The in-force version's partitions, each also as a FHIR R4 Observation.referenceRange element, and `referenceRange` beside them: the list an Observation would carry. `version` is null when nothing is in force. The path takes our code or the analyte's LOINC code. A partition of LMS age curves (method `lms`) has no fixed limits (`low` and `high` null, `curves` its age range): ask `?ages=0.5,4,12` and every partition lists under `atAges` its limits at each requested age it covers (for curves the 2.5th and 97.5th centiles at that exact age, each also as a referenceRange whose `age` is that age).",
    access: { permission: "intervals:read", lisKey: true },
    params: intervalsParams,
    query: intervalsQuery,
    success: { status: 200, description: "The analyte, its version in force and its partitions", schema: analyteIntervalsSchema },
    errors: [404],
  },
];

const studyNotFound: ErrorStatus[] = [404];
const studyWrite: ErrorStatus[] = [404, 409];

const STUDIES: ApiOperation[] = [
  {
    method: "get",
    path: "/api/v1/studies",
    operationId: "listStudies",
    tag: "Studies",
    summary: "Every study, newest first",
    access: { permission: "studies:write" },
    success: { status: 200, description: "`{studies: [study]}`", schema: described("{studies: [study]}") },
  },
  {
    method: "post",
    path: "/api/v1/studies",
    operationId: "createStudy",
    tag: "Studies",
    summary: "Open a study",
    access: { permission: "studies:write" },
    body: createStudyBody,
    success: { status: 201, description: "The study with `analyteCode`", schema: described("The study"), headers: location },
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}",
    operationId: "getStudy",
    tag: "Studies",
    summary: "One study with its analyte, uploads and counts",
    access: { permission: "studies:write" },
    params: studyIdParams,
    success: { status: 200, description: "The study", schema: described("{study, analyte, uploads, donorResultCount, …}") },
    errors: studyNotFound,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/close",
    operationId: "closeStudy",
    tag: "Studies",
    summary: "Close a study",
    description: "No more data can change; pending uploads are cancelled with it.",
    access: { permission: "studies:write" },
    params: studyIdParams,
    success: { status: 200, description: "The closed study", schema: described("The study") },
    errors: studyWrite,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/uploads",
    operationId: "createUpload",
    tag: "Studies",
    summary: "Upload healthy-donor results (kept pending)",
    description:
      "Checks a CSV or XLSX file against the study's analyte and keeps it pending: the validation report comes back, nothing is stored as donor results until the upload is committed. With `Accept: application/x-ndjson` the checking's progress lines come first, then one line with the outcome.",
    access: { permission: "studies:write" },
    params: studyIdParams,
    multipart: uploadFormSchema,
    success: {
      status: 201,
      description: "The pending upload and its validation report (200 with application/x-ndjson when progress was asked for)",
      content: [
        { type: "application/json", schema: described("{id, status: pending, rows: {total, valid, invalid}, problems, problemsOmitted, fileName, sha256, sizeBytes, format, sheet, headers, mapping}") },
        { type: "application/x-ndjson", schema: { type: "string", description: "Lines {checked, bytesRead, totalBytes}, then {status, upload} or {status, problem}" } },
      ],
      headers: location,
    },
    errors: studyWrite,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/uploads/preview",
    operationId: "previewUpload",
    tag: "Studies",
    summary: "Preview a file's columns before uploading",
    access: { permission: "studies:write" },
    params: studyIdParams,
    multipart: uploadFormSchema,
    success: { status: 200, description: "Headers, the mapping (sent or guessed), whether it is complete, the first rows", schema: described("{fileName, sizeBytes, headers, mapping, complete, rows, …}") },
    errors: studyWrite,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/uploads/{uploadId}/commit",
    operationId: "commitUpload",
    tag: "Studies",
    summary: "Store a pending upload's valid rows as donor results",
    access: { permission: "studies:write" },
    params: uploadIdParams,
    success: { status: 200, description: "The committed upload", schema: described("The upload") },
    errors: studyWrite,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/uploads/{uploadId}/cancel",
    operationId: "cancelUpload",
    tag: "Studies",
    summary: "Discard a pending upload",
    access: { permission: "studies:write" },
    params: uploadIdParams,
    success: { status: 200, description: "The cancelled upload", schema: described("The upload") },
    errors: studyWrite,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/donor-results",
    operationId: "listDonorResults",
    tag: "Studies",
    summary: "A page of the study's donor results",
    access: { permission: "donors:read" },
    params: studyIdParams,
    query: donorResultsQuery,
    success: { status: 200, description: "`{items: [{…, excluded, exclusion}], total, page, pageSize}`", schema: described("{items, total, page, pageSize}") },
    errors: studyNotFound,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/donor-results/lookup",
    operationId: "lookupDonorResults",
    tag: "Studies",
    summary: "Donor results by donor code",
    access: { permission: "donors:read" },
    params: studyIdParams,
    query: lookupQuery,
    success: { status: 200, description: "`{items: [{id, donorCode, sex, ageYears, value, excluded}], missing: [code]}`", schema: described("{items, missing}") },
    errors: studyNotFound,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/chart-data",
    operationId: "getStudyChartData",
    tag: "Studies",
    summary: "The strip chart of one partition",
    access: { permission: "donors:read" },
    params: studyIdParams,
    query: partitionQuery,
    success: { status: 200, description: "`{partition, n, censored, points: [{rank, value}], thinned}`", schema: described("{partition, n, censored, points, thinned}") },
    errors: studyNotFound,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/screen",
    operationId: "screenStudy",
    tag: "Studies",
    summary: "Run an outlier screen (proposes, excludes nothing)",
    access: { permission: "studies:write" },
    params: studyIdParams,
    body: screenBody,
    success: { status: 200, description: "The screen's proposals, each with the decision in effect", schema: described("{rule, partition, proposals, …}") },
    errors: studyNotFound,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/outlier-decisions",
    operationId: "listOutlierDecisions",
    tag: "Studies",
    summary: "The study's outlier decisions",
    access: { permission: "studies:write" },
    params: studyIdParams,
    query: listAllQuery,
    success: { status: 200, description: "`{items}`, newest first", schema: described("{items}") },
    errors: studyNotFound,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/outlier-decisions",
    operationId: "createOutlierDecision",
    tag: "Studies",
    summary: "Confirm or reject an outlier proposal",
    access: { permission: "studies:write" },
    params: studyIdParams,
    body: outlierDecisionBody,
    success: { status: 201, description: "The decision with the screen's evidence", schema: described("The outlier decision"), headers: location },
    errors: studyWrite,
  },
  {
    method: "delete",
    path: "/api/v1/studies/{id}/outlier-decisions/{decisionId}",
    operationId: "undoOutlierDecision",
    tag: "Studies",
    summary: "Undo an outlier decision",
    access: { permission: "studies:write" },
    params: decisionIdParams,
    success: { status: 200, description: "`{id, undoneAt, exclusionId}`", schema: described("{id, undoneAt, exclusionId}") },
    errors: studyWrite,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/exclusions",
    operationId: "listExclusions",
    tag: "Studies",
    summary: "The study's exclusions",
    access: { permission: "studies:write" },
    params: studyIdParams,
    query: listAllQuery,
    success: { status: 200, description: "`{items}`, newest first", schema: described("{items}") },
    errors: studyNotFound,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/exclusions",
    operationId: "createExclusions",
    tag: "Studies",
    summary: "Exclude donor results by hand (all or none)",
    access: { permission: "studies:write" },
    params: studyIdParams,
    body: exclusionsBody,
    success: { status: 201, description: "`{items}`: the exclusions made", schema: described("{items}") },
    errors: studyWrite,
  },
  {
    method: "delete",
    path: "/api/v1/studies/{id}/exclusions/{exclusionId}",
    operationId: "undoExclusion",
    tag: "Studies",
    summary: "Undo an exclusion",
    access: { permission: "studies:write" },
    params: exclusionIdParams,
    success: { status: 200, description: "The exclusion, undone", schema: described("The exclusion") },
    errors: studyWrite,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/partition-assessment",
    operationId: "createPartitionAssessment",
    tag: "Studies",
    summary: "Assess partitions by sex or age (Harris-Boyd, Lahti)",
    access: { permission: "studies:write" },
    params: studyIdParams,
    body: partitionAssessmentBody,
    success: { status: 201, description: "The assessment, kept", schema: described("The partition assessment") },
    errors: studyWrite,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/partition-assessments",
    operationId: "listPartitionAssessments",
    tag: "Studies",
    summary: "The study's partition assessments",
    access: { permission: "studies:write" },
    params: studyIdParams,
    success: { status: 200, description: "`{items}`, newest first", schema: described("{items}") },
    errors: studyNotFound,
  },
  {
    method: "put",
    path: "/api/v1/studies/{id}/partition-plan",
    operationId: "setPartitionPlan",
    tag: "Studies",
    summary: "Choose the study's partitions",
    access: { permission: "studies:write" },
    params: studyIdParams,
    body: partitionPlanBody,
    success: { status: 200, description: "`{partitionPlan, partitions}`", schema: described("{partitionPlan, partitions}") },
    errors: studyWrite,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/estimates",
    operationId: "listEstimates",
    tag: "Studies",
    summary: "The study's estimates in brief",
    access: { permission: "studies:write" },
    params: studyIdParams,
    success: { status: 200, description: "`{items}`, newest first", schema: described("{items}") },
    errors: studyNotFound,
  },
  {
    method: "post",
    path: "/api/v1/studies/{id}/estimates",
    operationId: "createEstimate",
    tag: "Studies",
    summary: "Estimate a partition's reference interval, fit an age-curve study's LMS curves, or estimate an indirect study's interval",
    description:
      'A direct study takes `{partition?, outliers?, transform?, seed?}`; an age-curve study takes `{method: "lms", sex?: "F"|"M"|null, seed?}` and fits the LMS centile curves to the donors of that sex (null: both); an indirect study takes `{method: "indirect", cleaning?: {period?: {from, to}|null, excludeSettings?: [..], excludeFlags?: [..]|"any", onePerPatient?: "first"|"last"|"all"}, partition?, seed?}`, runs the cleaning steps on its routine results (each recorded with the results it removed) and estimates by truncated maximum likelihood, with Bhattacharya\'s procedure as a second opinion (422 when fewer than 500 results remain). Each kind of study refuses the others\' requests with 409.',
    access: { permission: "studies:write" },
    params: studyIdParams,
    body: estimateRequestDocBody,
    success: {
      status: 201,
      description:
        "The command line's estimate document plus id, studyId, partition and createdAt; for an LMS fit the `bellwether lms` document `{n, at, lower, median, upper, L, M, S, edf, warnings}` plus `{method, sex, seed, model, ageRange, criterion, logLik, converged, excluded, diagnostics, sexComparison, advice, provenance}`; for an indirect estimate the `bellwether indirect` document `{n, lower, upper, lowerCi, upperCi, lambda, mu, sigma, fraction, truncation, chiSquare, secondOpinion, warnings}` plus `{method, df, pValue, accepted, censored, cells, bootstrap, cleaning: {results, excluded, plan, partition, steps: [{step, description, before, removed, remaining}]}, settings, histogram, model, advice, provenance}`",
      schema: described("The estimate document"),
      headers: location,
    },
    errors: studyWrite,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/estimates/{estimateId}",
    operationId: "getEstimate",
    tag: "Studies",
    summary: "One estimate",
    access: { permission: "studies:write" },
    params: estimateIdParams,
    success: { status: 200, description: "The estimate document", schema: described("The estimate document") },
    errors: studyNotFound,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/estimates/{estimateId}/chart-data",
    operationId: "getEstimateChartData",
    tag: "Studies",
    summary: "The histogram and Q-Q plot of an estimate",
    access: { permission: "donors:read" },
    params: estimateIdParams,
    success: { status: 200, description: "`{estimateId, partition, n, censored, scale, histogram, qq}`", schema: described("{estimateId, partition, n, censored, scale, histogram, qq}") },
    errors: studyNotFound,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/estimates/{estimateId}/age-curves",
    operationId: "getEstimateAgeCurves",
    tag: "Studies",
    summary: "The centile curves, donors and diagnostics of an LMS estimate",
    access: { permission: "donors:read" },
    params: estimateIdParams,
    success: {
      status: 200,
      description:
        "`{estimateId, sex, n, unit, ageRange: {min, max}, curves: [{age, lower, median, upper}], donors: {points: [{id, donorCode, sex, age, value, z}], thinned}, far: [donor], diagnostics: {groups, warnings, far}, warnings, advice}`",
      schema: described("{estimateId, sex, n, unit, ageRange, curves, donors, far, diagnostics, warnings, advice}"),
    },
    errors: studyWrite,
  },
  {
    method: "get",
    path: "/api/v1/studies/{id}/export",
    operationId: "exportStudy",
    tag: "Studies",
    summary: "The study as an XLSX workbook",
    access: { permission: "donors:read" },
    params: studyIdParams,
    success: { status: 200, description: "The workbook", content: binary(XLSX, "XLSX workbook") },
    errors: studyNotFound,
  },
  {
    method: "get",
    path: "/api/v1/uploads/template",
    operationId: "getUploadTemplate",
    tag: "Studies",
    summary: "The blank upload template (CSV or XLSX)",
    access: { permission: "studies:write" },
    query: templateQuery,
    success: {
      status: 200,
      description: "The template file",
      content: [
        { type: "text/csv", schema: { type: "string" } },
        { type: XLSX, schema: { type: "string", format: "binary" } },
      ],
    },
  },
];

const versionMove: ErrorStatus[] = [404, 409];

const VERSIONS: ApiOperation[] = [
  {
    method: "get",
    path: "/api/v1/interval-versions",
    operationId: "listIntervalVersions",
    tag: "Interval versions",
    summary: "Interval versions by analyte and state",
    access: { permission: "studies:write" },
    query: listVersionsQuery,
    success: { status: 200, description: "`{items}`", schema: described("{items}") },
  },
  {
    method: "post",
    path: "/api/v1/interval-versions",
    operationId: "createIntervalVersion",
    tag: "Interval versions",
    summary: "Draft an interval version",
    description: "From a study's estimates (`study`, `partitions`) or from an accepted adoption check (`adoptionCheck`).",
    access: { permission: "studies:write" },
    body: createVersionBody,
    success: { status: 201, description: "The draft version", schema: described("The interval version"), headers: location },
    errors: [404, 409],
  },
  {
    method: "get",
    path: "/api/v1/interval-versions/{id}",
    operationId: "getIntervalVersion",
    tag: "Interval versions",
    summary: "One version with its partitions and signatures",
    access: { permission: "studies:write" },
    params: versionIdParams,
    success: { status: 200, description: "The interval version", schema: described("The interval version") },
    errors: [404],
  },
  {
    method: "patch",
    path: "/api/v1/interval-versions/{id}",
    operationId: "updateIntervalVersion",
    tag: "Interval versions",
    summary: "Revise a draft",
    access: { permission: "studies:write" },
    params: versionIdParams,
    body: updateVersionBody,
    success: { status: 200, description: "The revised version", schema: described("The interval version") },
    errors: versionMove,
  },
  {
    method: "post",
    path: "/api/v1/interval-versions/{id}/submit",
    operationId: "submitIntervalVersion",
    tag: "Interval versions",
    summary: "Submit a draft for sign-off",
    access: { permission: "studies:write" },
    params: versionIdParams,
    success: { status: 200, description: "The version, awaiting sign-off", schema: described("The interval version") },
    errors: versionMove,
  },
  {
    method: "post",
    path: "/api/v1/interval-versions/{id}/return",
    operationId: "returnIntervalVersion",
    tag: "Interval versions",
    summary: "Return a version to draft with a comment",
    access: { permission: "versions:sign" },
    params: versionIdParams,
    body: returnVersionBody,
    success: { status: 200, description: "The version, back in draft", schema: described("The interval version") },
    errors: versionMove,
  },
  {
    method: "post",
    path: "/api/v1/interval-versions/{id}/sign",
    operationId: "signIntervalVersion",
    tag: "Interval versions",
    summary: "Sign a version off (electronic signature)",
    description: "Password, and the e-mail too at a session's first signature. 403 for a duty rule, a wrong password or a locked account.",
    access: { permission: "versions:sign" },
    params: versionIdParams,
    body: signVersionBody,
    success: { status: 200, description: "The version, in force", schema: described("The interval version") },
    errors: versionMove,
  },
  {
    method: "post",
    path: "/api/v1/interval-versions/{id}/review",
    operationId: "reviewIntervalVersion",
    tag: "Interval versions",
    summary: "Sign a review of a version in force",
    access: { permission: "versions:sign" },
    params: versionIdParams,
    body: reviewVersionBody,
    success: { status: 200, description: "The version with its next review-by date", schema: described("The interval version") },
    errors: versionMove,
  },
  {
    method: "post",
    path: "/api/v1/interval-versions/{id}/withdraw",
    operationId: "withdrawIntervalVersion",
    tag: "Interval versions",
    summary: "Withdraw a version in force",
    access: { permission: "versions:sign" },
    params: versionIdParams,
    body: withdrawVersionBody,
    success: { status: 200, description: "The withdrawn version", schema: described("The interval version") },
    errors: versionMove,
  },
  {
    method: "get",
    path: "/api/v1/interval-versions/{id}/canonical-content",
    operationId: "getCanonicalContent",
    tag: "Interval versions",
    summary: "The version's canonical content (RFC 8785) and its SHA-256",
    access: { permission: "donors:read" },
    params: versionIdParams,
    success: { status: 200, description: "`{canonicalContent, contentSha256}`", schema: described("{canonicalContent, contentSha256}") },
    errors: [404],
  },
  {
    method: "get",
    path: "/api/v1/interval-versions/{id}/comparison",
    operationId: "getVersionComparison",
    tag: "Interval versions",
    summary: "The version beside the one in force",
    access: { permission: "donors:read" },
    params: versionIdParams,
    success: { status: 200, description: "`{version, inForce, basis, partitions, removedPartitions, donorFlagChanges, recentScores}`: recentScores re-flags the patient scores of the last 90 days against this version", schema: described("The comparison") },
    errors: [404],
  },
  {
    method: "get",
    path: "/api/v1/interval-versions/{id}/dossier",
    operationId: "getVersionDossier",
    tag: "Interval versions",
    summary: "The version's dossier as an XLSX workbook",
    access: { permission: "dossiers:read" },
    params: versionIdParams,
    success: { status: 200, description: "The workbook", content: binary(XLSX, "XLSX workbook") },
    errors: [404],
  },
];

const ADOPTION: ApiOperation[] = [
  {
    method: "get",
    path: "/api/v1/adoption-checks",
    operationId: "listAdoptionChecks",
    tag: "Adoption checks",
    summary: "Adoption checks, newest first",
    access: { permission: "studies:write" },
    query: listAdoptionChecksQuery,
    success: { status: 200, description: "`{items}`", schema: described("{items}") },
  },
  {
    method: "post",
    path: "/api/v1/adoption-checks",
    operationId: "createAdoptionCheck",
    tag: "Adoption checks",
    summary: "Check an external interval against 20 local values",
    access: { permission: "studies:write" },
    body: createAdoptionCheckBody,
    success: { status: 201, description: "The check with its decision and reasoning", schema: described("The adoption check"), headers: location },
  },
  {
    method: "get",
    path: "/api/v1/adoption-checks/{id}",
    operationId: "getAdoptionCheck",
    tag: "Adoption checks",
    summary: "One adoption check",
    access: { permission: "studies:write" },
    params: adoptionCheckIdParams,
    success: { status: 200, description: "The adoption check", schema: described("The adoption check") },
    errors: [404],
  },
  {
    method: "post",
    path: "/api/v1/adoption-checks/{id}/second-set",
    operationId: "addAdoptionSecondSet",
    tag: "Adoption checks",
    summary: "The second set of 20 values",
    access: { permission: "studies:write" },
    params: adoptionCheckIdParams,
    body: secondSetBody,
    success: { status: 200, description: "The adoption check with both sets", schema: described("The adoption check") },
    errors: [404, 409],
  },
];

const ADMINISTRATION: ApiOperation[] = [
  {
    method: "get",
    path: "/api/v1/outbox",
    operationId: "listOutbox",
    tag: "Administration",
    summary: "The e-mail outbox, a page at a time",
    access: { permission: "users:manage" },
    query: outboxQuery,
    success: { status: 200, description: "`{items: [{id, kind, recipients, subject, text, status, attempts, lastError, createdAt, sentAt}], total, page, pageSize}`", schema: described("{items, total, page, pageSize}") },
  },
  {
    method: "post",
    path: "/api/v1/users/{id}/signing-unlock",
    operationId: "unlockSigning",
    tag: "Administration",
    summary: "Lift a signing lock",
    access: { permission: "users:manage" },
    params: userIdParams,
    success: { status: 200, description: "`{user: {id, name, email}, signingLocked: false, wasLocked}`", schema: described("{user, signingLocked, wasLocked}") },
    errors: [404],
  },
];


const LIS_CONNECTIONS: ApiOperation[] = [
  {
    method: "get",
    path: "/api/v1/lis-connections",
    operationId: "listLisConnections",
    tag: "Administration",
    summary: "LIS connections, active ones first",
    description: "Keys are never listed, only their first characters (`keyPrefix`).",
    access: { permission: "users:manage" },
    success: { status: 200, description: "Every connection", schema: lisConnectionListSchema },
  },
  {
    method: "post",
    path: "/api/v1/lis-connections",
    operationId: "createLisConnection",
    tag: "Administration",
    summary: "Create an LIS connection and its key",
    description: `The answer carries the key in \`key\`: this once, never again (only its SHA-256 is stored). The rate limit defaults to ${DEFAULT_RATE_PER_MINUTE.toLocaleString("en")} requests a minute.`,
    access: { permission: "users:manage" },
    body: createLisConnectionBody,
    success: { status: 201, description: "The connection and its `key`, shown this once", schema: createdLisConnectionSchema, headers: location },
  },
  {
    method: "get",
    path: "/api/v1/lis-connections/usage",
    operationId: "getLisUsage",
    tag: "Administration",
    summary: "Scores logged per connection and analyte (24 h, 7 days)",
    access: { permission: "users:manage" },
    success: { status: 200, description: "Counts by flag per connection and per analyte", schema: lisUsageSchema },
  },
  {
    method: "get",
    path: "/api/v1/lis-connections/{id}",
    operationId: "getLisConnection",
    tag: "Administration",
    summary: "One LIS connection",
    access: { permission: "users:manage" },
    params: lisConnectionParams,
    success: { status: 200, description: "The connection", schema: lisConnectionSchema },
    errors: [404],
  },
  {
    method: "patch",
    path: "/api/v1/lis-connections/{id}",
    operationId: "updateLisConnection",
    tag: "Administration",
    summary: "Rename a connection, change its contact or rate limit",
    access: { permission: "users:manage" },
    params: lisConnectionParams,
    body: updateLisConnectionBody,
    success: { status: 200, description: "The connection", schema: lisConnectionSchema },
    errors: [404, 409],
  },
  {
    method: "post",
    path: "/api/v1/lis-connections/{id}/revoke",
    operationId: "revokeLisConnection",
    tag: "Administration",
    summary: "Revoke a connection's key for good",
    access: { permission: "users:manage" },
    params: lisConnectionParams,
    success: { status: 200, description: "The revoked connection", schema: lisConnectionSchema },
    errors: [404, 409],
  },
];

const ACCOUNT: ApiOperation[] = [
  {
    method: "get",
    path: "/api/v1/me",
    operationId: "getMe",
    tag: "Account",
    summary: "Who is calling and what they may do",
    access: { permission: "intervals:read" },
    success: { status: 200, description: "`{id, email, name, role, permissions}`", schema: described("{id, email, name, role, permissions}") },
  },
  {
    method: "get",
    path: "/api/v1/openapi.json",
    operationId: "getOpenApiDocument",
    tag: "Account",
    summary: "This document",
    access: "public",
    success: { status: 200, description: "The OpenAPI 3.1 document", schema: described("OpenAPI 3.1 document") },
  },
];

export const API_OPERATIONS: readonly ApiOperation[] = [...SCORES, ...ANALYTES, ...STUDIES, ...VERSIONS, ...ADOPTION, ...ADMINISTRATION, ...LIS_CONNECTIONS, ...ACCOUNT];
