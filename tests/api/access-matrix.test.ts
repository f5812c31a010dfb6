/**
 * The access matrix (issue 12): every route handler and every server action, listed from the
 * code (tests/support/entry-points.ts), against every kind of caller: nobody, each role, a
 * deactivated user, a user whose password was changed in another session (their old session),
 * and an LIS key that is valid, revoked or forged. Exactly the cells DESIGN.md's roles table
 * allows succeed, with the handler's own success status; every other cell is refused with the
 * exact 401/403 answer and leaves the row count of every table as it was. The bodies that reach
 * a clinician or a key carry no donor-level data.
 *
 * All refusals run first, before any cell succeeds, so that a success's deferred writes (the
 * score log is flushed once a second) cannot land inside a refusal's before/after window.
 */
import { randomBytes } from "node:crypto";
import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { createUser, setUserActive } from "@/db/queries/users";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { countEveryTable } from "../support/table-counts";
import { builtServerActions, pagePaths, routeHandlerKeys, serverActionKeys } from "../support/entry-points";
import { BASE_URL, signInOverHttp } from "../support/http-session";
import { createLisConnectionOverHttp } from "../support/lis";
import { callServerAction, type ActionAnswer } from "../support/server-actions";
import { donorCsv, generatedRows } from "../support/studies";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

// ---------------------------------------------------------------------------------------------
// DESIGN.md's roles table, written out (not imported from lib/auth/roles.ts):
//
// | may                                                   | admin | director | scientist | clinician | LIS key |
// | manage users, LIS connections                         | yes   |          |           |           |         |
// | read audit trail                                      | yes   | yes      |           |           |         |
// | create studies, upload, exclude, estimate, draft, submit |    | yes      | yes       |           |         |
// | read donor-level data                                 |       | yes      | yes       |           |         |
// | sign off, return, withdraw a version                  |       | yes (never one they drafted or submitted) |  |  |  |
// | read in-force intervals, score values                 | yes   | yes      | yes       | yes       | yes     |
// ---------------------------------------------------------------------------------------------
/** A role, an LIS key, or a person whose password an administrator set (only their own password change is open). */
type Audience = Role | "key" | "password pending";
const MANAGE: readonly Audience[] = ["admin"];
const WORK: readonly Audience[] = ["director", "scientist"];
const DONORS: readonly Audience[] = ["director", "scientist"];
const SIGN: readonly Audience[] = ["director"];
const SERVE: readonly Audience[] = ["admin", "director", "scientist", "clinician", "key"];
/** Any signed-in person, no key: one's own account (the who-am-I endpoint, one's own password). */
const PEOPLE: readonly Audience[] = ["admin", "director", "scientist", "clinician"];
/**
 * A version's sign-off record and dossier: its authors and signers (WORK, SIGN) and the admin,
 * who reads the audit trail it carries; the admin's copy leaves out donor rows.
 */
const DOSSIER: readonly Audience[] = ["admin", "director", "scientist"];

type Principal =
  | "anonymous"
  | Role
  | "deactivated user"
  | "old session after password change"
  | "password set by an administrator"
  | "valid LIS key"
  | "revoked LIS key"
  | "forged LIS key";
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];
const PRINCIPALS: Principal[] = [
  "anonymous",
  ...ROLES,
  "deactivated user",
  "old session after password change",
  "password set by an administrator",
  "valid LIS key",
  "revoked LIS key",
  "forged LIS key",
];

// The answers, written out as the server words them.
const SIGN_IN = "Sign in to continue.";
const DEACTIVATED = "This account has been deactivated. Ask your administrator.";
const KEY_NOT_HERE =
  "An LIS key may only score values and read the analyte catalogue and the intervals in force; this endpoint needs a person signed in to Bellwether.";
const KEY_UNKNOWN =
  "The API key was not recognised. Send the whole key as `Authorization: Bearer bwk_…`, or ask your Bellwether administrator for a new one.";
const KEY_REVOKED = "This API key has been revoked. Ask your Bellwether administrator for a new one.";
const roleRefusal = (role: Role) => `Your role (${role}) may not do this.`;
const PASSWORD_PENDING =
  "An administrator set your password: choose your own before doing anything else. Sign in to Bellwether in a browser to change it.";

// ---------------------------------------------------------------------------------------------
// The callers
// ---------------------------------------------------------------------------------------------
const TAG = Date.now().toString(36).slice(-6).toUpperCase();
const PASSWORD = "matrix-test-password-1";
const NEW_PASSWORD = "matrix-test-password-2";
const CODE = `AM${TAG}`;
/** Donor codes of the matrix study: any of them in a clinician's or a key's answer is a leak. */
const DONOR_PREFIX = `MXDONOR${TAG}-`;

interface Person {
  id: string;
  email: string;
  cookie: string;
}
const people = {} as Record<Role | "deactivated" | "stale" | "pending" | "signer", Person>;
const keys = {} as Record<"valid" | "revoked" | "forged", string>;
let validConnectionId: string;

async function newPerson(role: Role, tag: string, { mustChangePassword = false } = {}): Promise<Person> {
  const email = `matrix.${tag}.${Date.now()}.${Math.floor(Math.random() * 1e6)}@integration.example`;
  const user = await createUser(database, { input: { email, name: `Matrix ${tag}`, role, password: PASSWORD, mustChangePassword }, actor: SYSTEM_ACTOR });
  return { id: user.id, email, cookie: await signInOverHttp(email, PASSWORD) };
}

interface Req {
  method: string;
  path: string;
  json?: unknown;
  form?: FormData;
  /** Another body with its own content type (FHIR). */
  raw?: { body: string; type: string };
}

const STATE_CHANGING = new Set(["POST", "PUT", "PATCH", "DELETE"]);

/** Sends a request as the principal: its session cookie, its key, or nothing. */
function send(principal: Principal, req: Req): Promise<Response> {
  const headers: Record<string, string> = {};
  const cookie = cookieOf(principal);
  if (cookie) {
    headers.cookie = cookie;
    // The app's own origin, as a browser sends it on a state-changing request from the app's pages.
    if (STATE_CHANGING.has(req.method)) headers.origin = BASE_URL;
  }
  const key = keyOf(principal);
  if (key) headers.authorization = `Bearer ${key}`;
  let body: BodyInit | undefined;
  if (req.json !== undefined) {
    headers["content-type"] = "application/json";
    body = JSON.stringify(req.json);
  } else if (req.form) {
    body = req.form;
  } else if (req.raw) {
    headers["content-type"] = req.raw.type;
    body = req.raw.body;
  }
  return fetch(`${BASE_URL}${req.path}`, { method: req.method, headers, body, redirect: "manual" });
}

function cookieOf(principal: Principal): string | null {
  switch (principal) {
    case "admin":
    case "director":
    case "scientist":
    case "clinician":
      return people[principal].cookie;
    case "deactivated user":
      return people.deactivated.cookie;
    case "old session after password change":
      return people.stale.cookie;
    case "password set by an administrator":
      return people.pending.cookie;
    default:
      return null;
  }
}

function keyOf(principal: Principal): string | null {
  return { "valid LIS key": keys.valid, "revoked LIS key": keys.revoked, "forged LIS key": keys.forged }[principal as string] ?? null;
}

/** The audience a principal belongs to when the table allows it, or null (refused whatever the row). */
function audienceOf(principal: Principal): Audience | null {
  if ((ROLES as string[]).includes(principal)) return principal as Role;
  if (principal === "password set by an administrator") return "password pending";
  return principal === "valid LIS key" ? "key" : null;
}

// ---------------------------------------------------------------------------------------------
// Row counts of every table (listed from information_schema, so a new table is counted too)
// ---------------------------------------------------------------------------------------------
/** Row counts of every table but the background ones (tests/support/table-counts.ts). */
function allCounts(): Promise<Record<string, number>> {
  return countEveryTable(pool);
}

// ---------------------------------------------------------------------------------------------
// Fixtures: our own analyte, study, estimate, versions and checks, so that no demo data changes
// ---------------------------------------------------------------------------------------------
let studyId: string;
let estimateId: string;
let baseVersionId: string;
let baseCheckId: string;
const freeDonorIds: number[] = [];

async function asJson(res: Response, status: number): Promise<Doc> {
  const text = await res.text();
  expect(res.status, text.slice(0, 500)).toBe(status);
  return JSON.parse(text);
}

const asScientist = (req: Req) => send("scientist", req);

async function openStudy(title: string): Promise<string> {
  return (await asJson(await asScientist({ method: "POST", path: "/api/v1/studies", json: { analyte: CODE, title, method: "Hexokinase", specimen: "serum" } }), 201)).id;
}

let uploadSeq = 0;
function uploadForm(rows = 20): FormData {
  uploadSeq += 1;
  const form = new FormData();
  form.set("file", new Blob([donorCsv(generatedRows(rows, 500 + uploadSeq, `${DONOR_PREFIX}U${uploadSeq}-`))]), `matrix-${uploadSeq}.csv`);
  return form;
}

async function pendingUpload(id: string): Promise<string> {
  return (await asJson(await asScientist({ method: "POST", path: `/api/v1/studies/${id}/uploads`, form: uploadForm() }), 201)).id;
}

function takeDonor(): number {
  const id = freeDonorIds.shift();
  if (id === undefined) throw new Error("the matrix study ran out of donor results");
  return id;
}

async function draftVersion(): Promise<string> {
  const res = await asScientist({
    method: "POST",
    path: "/api/v1/interval-versions",
    json: { analyte: CODE, study: studyId, partitions: [{ estimate: estimateId, method: "nonparametric" }] },
  });
  return (await asJson(res, 201)).id;
}

async function awaitingVersion(): Promise<string> {
  const id = await draftVersion();
  await asJson(await asScientist({ method: "POST", path: `/api/v1/interval-versions/${id}/submit` }), 200);
  return id;
}

/** In force, drafted and submitted by the scientist and signed by another director than the matrix one. */
async function inForceVersion(): Promise<string> {
  const id = await awaitingVersion();
  const res = await fetch(`${BASE_URL}/api/v1/interval-versions/${id}/sign`, {
    method: "POST",
    headers: { cookie: people.signer.cookie, origin: BASE_URL, "content-type": "application/json" },
    body: JSON.stringify({ password: PASSWORD, email: people.signer.email, meaning: "approved_for_clinical_use" }),
  });
  await asJson(res, 200);
  return id;
}

/** 20 values for an adoption check of [4, 6]: `outside` of them above the upper limit. */
function checkValues(outside: number): number[] {
  return Array.from({ length: 20 }, (_, i) => (i < outside ? 6.5 + i / 10 : 4.2 + i / 20));
}

async function adoptionCheck(outside: number): Promise<string> {
  const res = await asScientist({
    method: "POST",
    path: "/api/v1/adoption-checks",
    json: { analyte: CODE, sex: null, lower: 4, upper: 6, source: "Manufacturer's insert, matrix test", values: checkValues(outside) },
  });
  return (await asJson(res, 201)).id;
}

function observation(value: number): string {
  return JSON.stringify({
    resourceType: "Observation",
    status: "final",
    contained: [{ resourceType: "Patient", id: "pat", gender: "female", birthDate: "1971-06-14" }],
    code: { coding: [{ system: "http://loinc.org", code: "2823-3" }] },
    subject: { reference: "#pat" },
    effectiveDateTime: "2026-03-02T08:15:00Z",
    valueQuantity: { value, unit: "mmol/L", system: "http://unitsofmeasure.org", code: "mmol/L" },
  });
}

// ---------------------------------------------------------------------------------------------
// The route handlers' rows: who may (from the table above), the handler's own success status,
// and a request that succeeds for an allowed caller (fresh fixtures where the request changes state)
// ---------------------------------------------------------------------------------------------
interface RouteRow {
  /** Who may; "public" rows answer everyone alike (no caller is needed or checked). */
  allowed: readonly Audience[] | "public";
  ok: number;
  /** Errors are FHIR OperationOutcomes rather than problem+json. */
  fhir?: boolean;
  build: (who: Audience | null) => Promise<Req>;
}

const fixed = (req: Req) => async () => req;
const NOT_A_ROUTE = "/api/v1/no-such-endpoint";
const NOT_FHIR = "/api/v1/fhir/Patient";

const ROUTES: Record<string, RouteRow> = {
  // Public: next-auth's own endpoints, liveness, the OpenAPI document, the not-found answers.
  "GET /api/auth/[...nextauth]": { allowed: "public", ok: 200, build: fixed({ method: "GET", path: "/api/auth/csrf" }) },
  // A sign-out without next-auth's CSRF token is sent to the confirmation page, for everyone alike.
  "POST /api/auth/[...nextauth]": { allowed: "public", ok: 302, build: fixed({ method: "POST", path: "/api/auth/signout" }) },
  "GET /api/health": { allowed: "public", ok: 200, build: fixed({ method: "GET", path: "/api/health" }) },
  "GET /api/v1/openapi.json": { allowed: "public", ok: 200, build: fixed({ method: "GET", path: "/api/v1/openapi.json" }) },
  "GET /api/v1/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "GET", path: NOT_A_ROUTE }) },
  "POST /api/v1/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "POST", path: NOT_A_ROUTE }) },
  "PUT /api/v1/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "PUT", path: NOT_A_ROUTE }) },
  "PATCH /api/v1/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "PATCH", path: NOT_A_ROUTE }) },
  "DELETE /api/v1/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "DELETE", path: NOT_A_ROUTE }) },
  "GET /api/v1/fhir/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "GET", path: NOT_FHIR }) },
  "POST /api/v1/fhir/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "POST", path: NOT_FHIR }) },
  "PUT /api/v1/fhir/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "PUT", path: NOT_FHIR }) },
  "PATCH /api/v1/fhir/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "PATCH", path: NOT_FHIR }) },
  "DELETE /api/v1/fhir/[...path]": { allowed: "public", ok: 404, build: fixed({ method: "DELETE", path: NOT_FHIR }) },
  // $score is an operation to POST to: other methods are told so (405), whoever asks.
  "GET /api/v1/fhir/Observation/$score": { allowed: "public", ok: 405, build: fixed({ method: "GET", path: "/api/v1/fhir/Observation/$score" }) },
  "PUT /api/v1/fhir/Observation/$score": { allowed: "public", ok: 405, build: fixed({ method: "PUT", path: "/api/v1/fhir/Observation/$score" }) },
  "PATCH /api/v1/fhir/Observation/$score": { allowed: "public", ok: 405, build: fixed({ method: "PATCH", path: "/api/v1/fhir/Observation/$score" }) },
  "DELETE /api/v1/fhir/Observation/$score": { allowed: "public", ok: 405, build: fixed({ method: "DELETE", path: "/api/v1/fhir/Observation/$score" }) },

  // Read in-force intervals, score values: every role and LIS keys.
  "GET /api/v1/analytes": { allowed: SERVE, ok: 200, build: fixed({ method: "GET", path: "/api/v1/analytes" }) },
  "GET /api/v1/analytes/[code]": { allowed: SERVE, ok: 200, build: fixed({ method: "GET", path: "/api/v1/analytes/GLU" }) },
  "GET /api/v1/analytes/[code]/intervals": { allowed: SERVE, ok: 200, build: fixed({ method: "GET", path: "/api/v1/analytes/GLU/intervals" }) },
  "POST /api/v1/scores": {
    allowed: SERVE,
    ok: 200,
    build: fixed({ method: "POST", path: "/api/v1/scores", json: { items: [{ analyte: "GLU", value: 5.1, sex: "F", ageYears: 40 }, { analyte: "K", value: 4.2 }] } }),
  },
  "POST /api/v1/fhir/Observation/$score": {
    allowed: SERVE,
    ok: 200,
    fhir: true,
    build: fixed({ method: "POST", path: "/api/v1/fhir/Observation/$score", raw: { body: observation(4.2), type: "application/fhir+json" } }),
  },
  "GET /api/v1/me": { allowed: PEOPLE, ok: 200, build: fixed({ method: "GET", path: "/api/v1/me" }) },

  // The catalogue is part of the laboratory's work (directors and scientists edit it).
  "POST /api/v1/analytes": {
    allowed: WORK,
    ok: 201,
    build: async (who) => ({
      method: "POST",
      path: "/api/v1/analytes",
      json: { code: `${CODE.slice(0, 6)}${who === null ? "X" : who.slice(0, 1).toUpperCase()}${uploadSeq++}`, name: "Matrix analyte", unit: "mmol/L", decimals: 2, specimen: "serum", reviewMonths: 12 },
    }),
  },
  "PATCH /api/v1/analytes/[code]": { allowed: WORK, ok: 200, build: fixed({ method: "PATCH", path: `/api/v1/analytes/${CODE}`, json: { name: `Matrix analyte ${TAG}` } }) },

  // Studies: create, upload, exclude, estimate (directors and scientists).
  "GET /api/v1/studies": { allowed: WORK, ok: 200, build: fixed({ method: "GET", path: "/api/v1/studies" }) },
  "POST /api/v1/studies": { allowed: WORK, ok: 201, build: async () => ({ method: "POST", path: "/api/v1/studies", json: { analyte: CODE, title: "Matrix study" } }) },
  "GET /api/v1/studies/[id]": { allowed: WORK, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}` }) },
  "POST /api/v1/studies/[id]/close": { allowed: WORK, ok: 200, build: async () => ({ method: "POST", path: `/api/v1/studies/${await openStudy("Matrix study to close")}/close` }) },
  "GET /api/v1/studies/[id]/chart-data": { allowed: DONORS, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/chart-data` }) },
  "GET /api/v1/studies/[id]/donor-results": { allowed: DONORS, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/donor-results` }) },
  "GET /api/v1/studies/[id]/donor-results/lookup": {
    allowed: DONORS,
    ok: 200,
    build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/donor-results/lookup?codes=${DONOR_PREFIX}1` }),
  },
  "GET /api/v1/studies/[id]/estimates": { allowed: WORK, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/estimates` }) },
  "POST /api/v1/studies/[id]/estimates": {
    allowed: WORK,
    ok: 201,
    build: async () => ({ method: "POST", path: `/api/v1/studies/${studyId}/estimates`, json: { outliers: "none", seed: 11 } }),
  },
  "GET /api/v1/studies/[id]/estimates/[estimateId]": { allowed: WORK, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/estimates/${estimateId}` }) },
  "GET /api/v1/studies/[id]/estimates/[estimateId]/chart-data": {
    allowed: DONORS,
    ok: 200,
    build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/estimates/${estimateId}/chart-data` }),
  },
  "GET /api/v1/studies/[id]/estimates/[estimateId]/age-curves": {
    allowed: DONORS,
    ok: 200,
    // Read-only, so the demo's paediatric age-curve study (db/seed-demo) serves.
    build: async () => {
      const { rows } = await pool.query<{ id: string; study_id: string }>(
        "SELECT id, study_id FROM estimates WHERE options->>'method' = 'lms' ORDER BY created_at LIMIT 1",
      );
      expect(rows).toHaveLength(1);
      return { method: "GET", path: `/api/v1/studies/${rows[0].study_id}/estimates/${rows[0].id}/age-curves` };
    },
  },
  "GET /api/v1/studies/[id]/exclusions": { allowed: WORK, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/exclusions` }) },
  "POST /api/v1/studies/[id]/exclusions": {
    allowed: WORK,
    ok: 201,
    build: async () => ({ method: "POST", path: `/api/v1/studies/${studyId}/exclusions`, json: { donorResultIds: [takeDonor()], reason: "Matrix: haemolysed sample" } }),
  },
  "DELETE /api/v1/studies/[id]/exclusions/[exclusionId]": {
    allowed: WORK,
    ok: 200,
    build: async () => {
      const made = await asJson(
        await asScientist({ method: "POST", path: `/api/v1/studies/${studyId}/exclusions`, json: { donorResultIds: [takeDonor()], reason: "Matrix: to undo" } }),
        201,
      );
      const exclusionId = (made.exclusions ?? made.items ?? [made])[0].id;
      return { method: "DELETE", path: `/api/v1/studies/${studyId}/exclusions/${exclusionId}` };
    },
  },
  "GET /api/v1/studies/[id]/outlier-decisions": { allowed: WORK, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/outlier-decisions` }) },
  "POST /api/v1/studies/[id]/outlier-decisions": {
    allowed: WORK,
    ok: 201,
    build: async () => ({
      method: "POST",
      path: `/api/v1/studies/${studyId}/outlier-decisions`,
      json: { donorResultId: takeDonor(), decision: "keep", reason: "Matrix: plausible value", rule: "tukey" },
    }),
  },
  "DELETE /api/v1/studies/[id]/outlier-decisions/[decisionId]": {
    allowed: WORK,
    ok: 200,
    build: async () => {
      const made = await asJson(
        await asScientist({
          method: "POST",
          path: `/api/v1/studies/${studyId}/outlier-decisions`,
          json: { donorResultId: takeDonor(), decision: "keep", reason: "Matrix: to undo", rule: "tukey" },
        }),
        201,
      );
      return { method: "DELETE", path: `/api/v1/studies/${studyId}/outlier-decisions/${made.id}` };
    },
  },
  "POST /api/v1/studies/[id]/partition-assessment": {
    allowed: WORK,
    ok: 201,
    build: async () => ({ method: "POST", path: `/api/v1/studies/${studyId}/partition-assessment`, json: { by: "sex" } }),
  },
  "GET /api/v1/studies/[id]/partition-assessments": { allowed: WORK, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/partition-assessments` }) },
  "PUT /api/v1/studies/[id]/partition-plan": {
    allowed: WORK,
    ok: 200,
    build: async () => ({ method: "PUT", path: `/api/v1/studies/${studyId}/partition-plan`, json: { sex: false, ageBands: null } }),
  },
  "POST /api/v1/studies/[id]/screen": { allowed: WORK, ok: 200, build: async () => ({ method: "POST", path: `/api/v1/studies/${studyId}/screen`, json: { rule: "tukey" } }) },
  "GET /api/v1/studies/[id]/export": { allowed: DONORS, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/studies/${studyId}/export` }) },
  "POST /api/v1/studies/[id]/uploads": { allowed: WORK, ok: 201, build: async () => ({ method: "POST", path: `/api/v1/studies/${studyId}/uploads`, form: uploadForm() }) },
  "POST /api/v1/studies/[id]/uploads/preview": {
    allowed: WORK,
    ok: 200,
    build: async () => ({ method: "POST", path: `/api/v1/studies/${studyId}/uploads/preview`, form: uploadForm() }),
  },
  "POST /api/v1/studies/[id]/uploads/[uploadId]/commit": {
    allowed: WORK,
    ok: 200,
    build: async () => {
      const id = await openStudy("Matrix study to commit");
      return { method: "POST", path: `/api/v1/studies/${id}/uploads/${await pendingUpload(id)}/commit` };
    },
  },
  "POST /api/v1/studies/[id]/uploads/[uploadId]/cancel": {
    allowed: WORK,
    ok: 200,
    build: async () => ({ method: "POST", path: `/api/v1/studies/${studyId}/uploads/${await pendingUpload(studyId)}/cancel` }),
  },
  "GET /api/v1/uploads/template": { allowed: WORK, ok: 200, build: fixed({ method: "GET", path: "/api/v1/uploads/template?format=csv" }) },

  // Adoption checks: verifying an interval the laboratory adopts is the same work.
  "GET /api/v1/adoption-checks": { allowed: WORK, ok: 200, build: fixed({ method: "GET", path: "/api/v1/adoption-checks" }) },
  "POST /api/v1/adoption-checks": {
    allowed: WORK,
    ok: 201,
    build: async () => ({
      method: "POST",
      path: "/api/v1/adoption-checks",
      json: { analyte: CODE, sex: null, lower: 4, upper: 6, source: "Matrix publication", values: checkValues(0) },
    }),
  },
  "GET /api/v1/adoption-checks/[id]": { allowed: WORK, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/adoption-checks/${baseCheckId}` }) },
  "POST /api/v1/adoption-checks/[id]/second-set": {
    allowed: WORK,
    ok: 200,
    build: async () => ({ method: "POST", path: `/api/v1/adoption-checks/${await adoptionCheck(3)}/second-set`, json: { values: checkValues(0) } }),
  },

  // Interval versions: drafting and submitting is work; signing, returning, reviewing and
  // withdrawing are the director's; the evidence behind a version (canonical content with the
  // empirical values, the donor comparison) is donor-level.
  "GET /api/v1/interval-versions": { allowed: WORK, ok: 200, build: fixed({ method: "GET", path: `/api/v1/interval-versions?analyte=${CODE}` }) },
  "POST /api/v1/interval-versions": {
    allowed: WORK,
    ok: 201,
    build: async () => ({
      method: "POST",
      path: "/api/v1/interval-versions",
      json: { analyte: CODE, study: studyId, partitions: [{ estimate: estimateId, method: "nonparametric" }] },
    }),
  },
  "GET /api/v1/interval-versions/[id]": { allowed: WORK, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/interval-versions/${baseVersionId}` }) },
  "PATCH /api/v1/interval-versions/[id]": {
    allowed: WORK,
    ok: 200,
    build: async () => ({ method: "PATCH", path: `/api/v1/interval-versions/${await draftVersion()}`, json: { note: "Matrix: revised note" } }),
  },
  "POST /api/v1/interval-versions/[id]/submit": { allowed: WORK, ok: 200, build: async () => ({ method: "POST", path: `/api/v1/interval-versions/${await draftVersion()}/submit` }) },
  "POST /api/v1/interval-versions/[id]/return": {
    allowed: SIGN,
    ok: 200,
    build: async () => ({ method: "POST", path: `/api/v1/interval-versions/${await awaitingVersion()}/return`, json: { comment: "Matrix: explain the low donors." } }),
  },
  "POST /api/v1/interval-versions/[id]/sign": {
    allowed: SIGN,
    ok: 200,
    build: async () => ({
      method: "POST",
      path: `/api/v1/interval-versions/${await awaitingVersion()}/sign`,
      json: { password: PASSWORD, email: people.director.email, meaning: "approved_for_clinical_use" },
    }),
  },
  "POST /api/v1/interval-versions/[id]/review": {
    allowed: SIGN,
    ok: 200,
    build: async () => ({
      method: "POST",
      path: `/api/v1/interval-versions/${await inForceVersion()}/review`,
      json: { password: PASSWORD, email: people.director.email, comment: "Matrix: the population is unchanged." },
    }),
  },
  "POST /api/v1/interval-versions/[id]/withdraw": {
    allowed: SIGN,
    ok: 200,
    build: async () => ({
      method: "POST",
      path: `/api/v1/interval-versions/${await inForceVersion()}/withdraw`,
      json: { password: PASSWORD, email: people.director.email, reason: "Matrix: method changed." },
    }),
  },
  "GET /api/v1/interval-versions/[id]/canonical-content": {
    allowed: DONORS,
    ok: 200,
    build: async () => ({ method: "GET", path: `/api/v1/interval-versions/${baseVersionId}/canonical-content` }),
  },
  "GET /api/v1/interval-versions/[id]/comparison": { allowed: DONORS, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/interval-versions/${baseVersionId}/comparison` }) },
  "GET /api/v1/interval-versions/[id]/dossier": { allowed: DOSSIER, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/interval-versions/${baseVersionId}/dossier` }) },

  // Users and LIS connections: the admin's.
  "GET /api/v1/lis-connections": { allowed: MANAGE, ok: 200, build: fixed({ method: "GET", path: "/api/v1/lis-connections" }) },
  "POST /api/v1/lis-connections": {
    allowed: MANAGE,
    ok: 201,
    build: async () => ({ method: "POST", path: "/api/v1/lis-connections", json: { name: `Matrix LIS ${TAG} ${uploadSeq++}`, contactEmail: `lis.${TAG.toLowerCase()}@integration.example` } }),
  },
  "GET /api/v1/lis-connections/[id]": { allowed: MANAGE, ok: 200, build: async () => ({ method: "GET", path: `/api/v1/lis-connections/${validConnectionId}` }) },
  "PATCH /api/v1/lis-connections/[id]": {
    allowed: MANAGE,
    ok: 200,
    build: async () => ({ method: "PATCH", path: `/api/v1/lis-connections/${validConnectionId}`, json: { contactEmail: `lis.desk.${TAG.toLowerCase()}@integration.example` } }),
  },
  "POST /api/v1/lis-connections/[id]/revoke": {
    allowed: MANAGE,
    ok: 200,
    build: async () => {
      const { id } = await createLisConnectionOverHttp(people.admin.cookie, { name: `Matrix LIS to revoke ${TAG} ${uploadSeq++}`, contactEmail: "revoke.me@integration.example" });
      return { method: "POST", path: `/api/v1/lis-connections/${id}/revoke` };
    },
  },
  "GET /api/v1/lis-connections/usage": { allowed: MANAGE, ok: 200, build: fixed({ method: "GET", path: "/api/v1/lis-connections/usage" }) },
  "GET /api/v1/outbox": { allowed: MANAGE, ok: 200, build: fixed({ method: "GET", path: "/api/v1/outbox" }) },
  "POST /api/v1/users/[id]/signing-unlock": { allowed: MANAGE, ok: 200, build: async () => ({ method: "POST", path: `/api/v1/users/${people.signer.id}/signing-unlock` }) },
};

// ---------------------------------------------------------------------------------------------
// The server actions' rows
// ---------------------------------------------------------------------------------------------
interface ActionRow {
  allowed: readonly Audience[];
  /** The fields of a form that succeeds for an allowed caller, and the cookie to send when it is not the caller's own. */
  build: (who: Audience | null) => Promise<{ fields: Record<string, string>; cookie?: string }>;
  /** Success: a message, or the page the action goes to. */
  ok: { state: "ok" } | { redirect: RegExp };
}

async function spareUser(role: Role): Promise<Person> {
  return newPerson(role, `spare-${role}`);
}

const ACTIONS: Record<string, ActionRow> = {
  "app/(admin)/admin/users/actions.ts#createUserAction": {
    allowed: MANAGE,
    ok: { state: "ok" },
    build: async () => ({
      fields: { name: "Matrix New Person", email: `matrix.created.${Date.now()}.${uploadSeq++}@integration.example`, role: "clinician", password: PASSWORD },
    }),
  },
  "app/(admin)/admin/users/actions.ts#changeRoleAction": {
    allowed: MANAGE,
    ok: { state: "ok" },
    build: async () => ({ fields: { id: (await spareUser("clinician")).id, role: "scientist" } }),
  },
  "app/(admin)/admin/users/actions.ts#setActiveAction": {
    allowed: MANAGE,
    ok: { state: "ok" },
    build: async () => ({ fields: { id: (await spareUser("clinician")).id, active: "false" } }),
  },
  "app/(admin)/admin/users/actions.ts#setPasswordAction": {
    allowed: MANAGE,
    ok: { state: "ok" },
    build: async () => ({ fields: { id: (await spareUser("clinician")).id, password: NEW_PASSWORD } }),
  },
  // One's own password: any signed-in person (a spare account of the role, so the matrix's own sessions live on).
  "app/(workspace)/account/actions.ts#changeOwnPasswordAction": {
    allowed: [...PEOPLE, "password pending"],
    ok: { state: "ok" },
    build: async (who) => {
      const fields = { current: PASSWORD, next: NEW_PASSWORD, confirm: NEW_PASSWORD };
      if (who === null || who === "key") return { fields };
      const spare = who === "password pending" ? await newPerson("scientist", "spare-pending", { mustChangePassword: true }) : await spareUser(who);
      return { fields, cookie: spare.cookie };
    },
  },
  "app/(lab)/adoption-checks/actions.ts#createAdoptionCheckAction": {
    allowed: WORK,
    ok: { redirect: /^\/adoption-checks\/[0-9a-f-]{36}$/ },
    build: async () => ({ fields: { analyte: CODE, sex: "", lower: "4", upper: "6", source: "Matrix insert", values: checkValues(0).join("\n") } }),
  },
  "app/(lab)/adoption-checks/actions.ts#secondSetAction": {
    allowed: WORK,
    ok: { state: "ok" },
    build: async () => ({ fields: { id: await adoptionCheck(3), values: checkValues(0).join("\n") } }),
  },
  "app/(lab)/adoption-checks/actions.ts#draftFromCheckAction": {
    allowed: WORK,
    ok: { state: "ok" },
    build: async () => ({ fields: { id: await adoptionCheck(0), analyte: CODE, note: "" } }),
  },
  "app/(lab)/analytes/actions.ts#createAnalyteAction": {
    allowed: WORK,
    ok: { state: "ok" },
    build: async () => ({ fields: { code: `${CODE.slice(0, 6)}A${uploadSeq++}`, name: "Matrix form analyte", unit: "mmol/L", decimals: "2", specimen: "serum", reviewMonths: "12" } }),
  },
  "app/(lab)/analytes/actions.ts#updateAnalyteAction": {
    allowed: WORK,
    ok: { state: "ok" },
    build: async () => ({ fields: { code: CODE, name: `Matrix analyte (form) ${TAG}` } }),
  },
  "app/(lab)/studies/actions.ts#createStudyAction": {
    allowed: WORK,
    ok: { redirect: /^\/studies\/[0-9a-f-]{36}$/ },
    build: async () => ({ fields: { analyte: CODE, title: "Matrix study from the form" } }),
  },
};


// ---------------------------------------------------------------------------------------------
// The pages' rows (they are read through the same checks: requirePageCaller on the server)
// ---------------------------------------------------------------------------------------------
interface PageRow {
  allowed: readonly Audience[] | "sign-in" | "change-password";
  path: () => string;
}

const PAGES: Record<string, PageRow> = {
  "/": { allowed: PEOPLE, path: () => "/" },
  "/account": { allowed: PEOPLE, path: () => "/account" },
  "/api-docs": { allowed: PEOPLE, path: () => "/api-docs" },
  "/score": { allowed: PEOPLE, path: () => "/score" },
  "/analytes": { allowed: PEOPLE, path: () => "/analytes" },
  "/intervals": { allowed: PEOPLE, path: () => "/intervals" },
  "/intervals/[code]": { allowed: PEOPLE, path: () => `/intervals/${CODE}` },
  "/studies": { allowed: WORK, path: () => "/studies" },
  "/studies/[id]": { allowed: WORK, path: () => `/studies/${studyId}` },
  "/adoption-checks": { allowed: WORK, path: () => "/adoption-checks" },
  "/adoption-checks/[id]": { allowed: WORK, path: () => `/adoption-checks/${baseCheckId}` },
  "/versions/[id]": { allowed: WORK, path: () => `/versions/${baseVersionId}` },
  "/versions/[id]/record": { allowed: DOSSIER, path: () => `/versions/${baseVersionId}/record` },
  "/signoff": { allowed: SIGN, path: () => "/signoff" },
  "/audit": { allowed: ["admin", "director"], path: () => "/audit" },
  "/admin/users": { allowed: MANAGE, path: () => "/admin/users" },
  "/admin/lis-connections": { allowed: MANAGE, path: () => "/admin/lis-connections" },
  "/admin/outbox": { allowed: MANAGE, path: () => "/admin/outbox" },
  "/sign-in": { allowed: "sign-in", path: () => "/sign-in" },
  "/change-password": { allowed: "change-password", path: () => "/change-password" },
};

/** What a page answers a principal: its status and, for a redirect, where to (the path only). */
function expectedPage(row: PageRow, principal: Principal): { status: number; to: string | null } {
  const audience = audienceOf(principal);
  const signedIn = cookieOf(principal) !== null;
  const active = signedIn && principal !== "deactivated user" && principal !== "old session after password change";
  if (row.allowed === "sign-in") return active ? { status: 307, to: "/" } : { status: 200, to: null };
  if (!signedIn) return { status: 307, to: "/sign-in" };
  if (!active) return { status: 307, to: "/sign-in" };
  if (row.allowed === "change-password") return audience === "password pending" ? { status: 200, to: null } : { status: 307, to: "/account" };
  if (audience === "password pending") return { status: 307, to: "/change-password" };
  return row.allowed.includes(audience!) ? { status: 200, to: null } : { status: 403, to: null };
}

async function visit(principal: Principal, pagePath: string): Promise<{ status: number; to: string | null; text: string }> {
  const headers: Record<string, string> = {};
  const cookie = cookieOf(principal);
  if (cookie) headers.cookie = cookie;
  const key = keyOf(principal);
  if (key) headers.authorization = `Bearer ${key}`;
  const res = await fetch(`${BASE_URL}${pagePath}`, { headers, redirect: "manual" });
  const location = res.headers.get("location");
  return { status: res.status, to: location === null ? null : new URL(location, BASE_URL).pathname, text: await res.text() };
}

/** A run of five consecutive reference values of an empirical model in force, as JSON writes them. */
function referenceRuns(): string[] {
  return referenceArrays.flatMap((values) => {
    const runs: string[] = [];
    for (let i = 0; i + 5 <= values.length; i += Math.max(1, Math.floor(values.length / 20))) runs.push(values.slice(i, i + 5).join(","));
    return runs;
  });
}

// ---------------------------------------------------------------------------------------------
// Donor-level data in an answer
// ---------------------------------------------------------------------------------------------
let referenceValues = new Set<number>();
let referenceArrays: number[][] = [];

/** Reference values of every empirical scoring model in force: the donor values a model keeps on the server. */
async function loadReferenceValues(): Promise<void> {
  const rows = (
    await pool.query(
      `SELECT p.model->'values' AS v FROM interval_partitions p JOIN interval_versions v ON v.id = p.version_id
        WHERE v.state = 'in_force' AND p.model->>'kind' = 'empirical'`,
    )
  ).rows as { v: number[] | null }[];
  referenceArrays = rows.map((r) => r.v ?? []);
  referenceValues = new Set(referenceArrays.flat());
  expect(referenceValues.size).toBeGreaterThan(0);
}

/** Where the answer carries donor-level data: a donor code, a donor field, or a list of reference values. */
function donorLeaks(text: string): string[] {
  const leaks: string[] = [];
  if (text.includes(DONOR_PREFIX)) leaks.push("a donor code of the matrix study");
  let doc: unknown;
  try {
    doc = JSON.parse(text);
  } catch {
    return leaks;
  }
  const walk = (node: unknown, where: string) => {
    if (Array.isArray(node)) {
      const numbers = node.filter((x): x is number => typeof x === "number");
      if (numbers.length >= 5 && numbers.length === node.length && numbers.every((x) => referenceValues.has(x))) {
        leaks.push(`${where}: a list of ${numbers.length} reference values`);
      }
      node.forEach((x, i) => walk(x, `${where}[${i}]`));
    } else if (node && typeof node === "object") {
      for (const [k, v] of Object.entries(node)) {
        if (/donor/i.test(k)) leaks.push(`${where}.${k}: a donor field`);
        walk(v, `${where}.${k}`);
      }
    }
  };
  walk(doc, "$");
  return leaks;
}

/** The sheets of a workbook, the audit trail's aside, with a cell naming a donor of the matrix study. */
async function sheetsNamingDonors(bytes: Buffer): Promise<string[]> {
  const workbook = new ExcelJS.Workbook();
  await workbook.xlsx.load(bytes as unknown as ArrayBuffer);
  const found: string[] = [];
  workbook.eachSheet((sheet) => {
    if (sheet.name === "Audit events") return;
    sheet.eachRow((r) =>
      r.eachCell((cell) => {
        if (String(cell.text ?? "").includes(DONOR_PREFIX) && !found.includes(sheet.name)) found.push(sheet.name);
      }),
    );
  });
  return found;
}

// ---------------------------------------------------------------------------------------------
// Set-up
// ---------------------------------------------------------------------------------------------
beforeAll(async () => {
  for (const role of ROLES) people[role] = await newPerson(role, role);
  people.signer = await newPerson("director", "signer");

  // A deactivated user: signed in while active, then deactivated (which also ends the session's version).
  people.deactivated = await newPerson("director", "deactivated");
  await setUserActive(database, { id: people.deactivated.id, active: false, actor: SYSTEM_ACTOR });

  // A person whose password an administrator chose: until they choose their own, nothing else is open.
  people.pending = await newPerson("director", "pending", { mustChangePassword: true });

  // A user whose password was changed in another of their sessions: this session is the old one.
  people.stale = await newPerson("admin", "stale");
  const other = await signInOverHttp(people.stale.email, PASSWORD);
  const changed = await callServerAction(
    "app/(workspace)/account/actions.ts#changeOwnPasswordAction",
    { current: PASSWORD, next: NEW_PASSWORD, confirm: NEW_PASSWORD },
    { cookie: other },
  );
  expect(changed).toMatchObject({ kind: "state", state: { status: "ok" } });

  const valid = await createLisConnectionOverHttp(people.admin.cookie, { name: `Matrix LIS ${TAG}`, contactEmail: `lis.${TAG.toLowerCase()}@integration.example`, ratePerMinute: 100_000 });
  keys.valid = valid.key;
  validConnectionId = valid.id;
  const revoked = await createLisConnectionOverHttp(people.admin.cookie, { name: `Matrix revoked LIS ${TAG}`, contactEmail: "revoked.lis@integration.example" });
  await asJson(await send("admin", { method: "POST", path: `/api/v1/lis-connections/${revoked.id}/revoke` }), 200);
  keys.revoked = revoked.key;
  keys.forged = `bwk_${randomBytes(32).toString("base64url")}`;

  await asJson(
    await asScientist({ method: "POST", path: "/api/v1/analytes", json: { code: CODE, name: `Matrix analyte ${TAG}`, unit: "mmol/L", decimals: 2, specimen: "serum", reviewMonths: 12 } }),
    201,
  );
  studyId = await openStudy(`Matrix study ${TAG}`);
  const form = new FormData();
  form.set("file", new Blob([donorCsv(generatedRows(150, 91, DONOR_PREFIX))]), "matrix-donors.csv");
  const report = await asJson(await asScientist({ method: "POST", path: `/api/v1/studies/${studyId}/uploads`, form }), 201);
  await asJson(await asScientist({ method: "POST", path: `/api/v1/studies/${studyId}/uploads/${report.id}/commit` }), 200);
  freeDonorIds.push(...(await pool.query("SELECT id FROM donor_results WHERE study_id = $1 ORDER BY id", [studyId])).rows.map((r) => Number(r.id)));
  estimateId = (await asJson(await asScientist({ method: "POST", path: `/api/v1/studies/${studyId}/estimates`, json: { outliers: "none", seed: 3 } }), 201)).id;
  baseVersionId = await draftVersion();
  baseCheckId = await adoptionCheck(0);
  // One version of the matrix analyte in force, so that the reference values of its empirical model are known too.
  await inForceVersion();
  await loadReferenceValues();
}, 240_000);

// ---------------------------------------------------------------------------------------------
// The tests
// ---------------------------------------------------------------------------------------------
describe("every entry point has a row", () => {
  it("lists every route handler and method of app/**/route.ts in the matrix, and nothing else", () => {
    expect(Object.keys(ROUTES).sort()).toEqual(routeHandlerKeys());
  });

  it("lists every exported function of every \"use server\" file in the matrix, and nothing else", () => {
    expect(Object.keys(ACTIONS).sort()).toEqual(serverActionKeys());
  });

  it("lists every page of app/**/page.tsx in the matrix, and nothing else", () => {
    expect(Object.keys(PAGES).sort()).toEqual(pagePaths());
  });

  it("lists every server action of the production build (inline ones included) in the matrix", () => {
    expect(builtServerActions().map((a) => a.key).sort()).toEqual(Object.keys(ACTIONS).sort());
  });
});

/** The exact refusal for a principal the row does not allow. */
function refusalOf(principal: Principal): { status: number; detail: string } {
  switch (principal) {
    case "anonymous":
    case "old session after password change":
      return { status: 401, detail: SIGN_IN };
    case "deactivated user":
      return { status: 401, detail: DEACTIVATED };
    case "password set by an administrator":
      return { status: 403, detail: PASSWORD_PENDING };
    case "valid LIS key":
      return { status: 403, detail: KEY_NOT_HERE };
    case "revoked LIS key":
      return { status: 401, detail: KEY_REVOKED };
    case "forged LIS key":
      return { status: 401, detail: KEY_UNKNOWN };
    default:
      return { status: 403, detail: roleRefusal(principal as Role) };
  }
}

async function answerOf(res: Response, fhir: boolean): Promise<{ status: number; detail: string }> {
  const type = res.headers.get("content-type");
  const body = await res.json();
  if (fhir) {
    expect(type).toMatch(/^application\/fhir\+json(;|$)/);
    expect(body.resourceType).toBe("OperationOutcome");
    expect(body.issue).toHaveLength(1);
    expect(body.issue[0].code).toBe(res.status === 401 ? "login" : "forbidden");
    return { status: res.status, detail: body.issue[0].diagnostics };
  }
  expect(type).toBe("application/problem+json");
  expect(body.status).toBe(res.status);
  return { status: res.status, detail: body.detail };
}

const allowedFor = (row: { allowed: readonly Audience[] | "public" }, principal: Principal) => {
  const audience = audienceOf(principal);
  return row.allowed !== "public" && audience !== null && row.allowed.includes(audience);
};

describe("route handlers: every refused cell is refused exactly, and changes nothing", () => {
  beforeAll(async () => {
    // Deferred writes of the set-up (the score log, key usage) land before the first comparison.
    let last = JSON.stringify(await allCounts());
    for (let i = 0; i < 10; i++) {
      await new Promise((r) => setTimeout(r, 1200));
      const now = JSON.stringify(await allCounts());
      if (now === last) break;
      last = now;
    }
  }, 30_000);

  for (const [key, row] of Object.entries(ROUTES)) {
    it(key, async () => {
      const req = await row.build(null);
      for (const principal of PRINCIPALS) {
        if (row.allowed === "public" || allowedFor(row, principal)) continue;
        const before = await allCounts();
        const res = await send(principal, req);
        const expected = refusalOf(principal);
        expect({ principal, ...(await answerOf(res, row.fhir ?? false)) }).toEqual({ principal, ...expected });
        if (expected.status === 401) expect(res.headers.get("www-authenticate")).toBe('Bearer realm="bellwether"');
        expect({ principal, counts: await allCounts() }).toEqual({ principal, counts: before });
      }
    });
  }
});

describe("server actions: every refused cell is refused exactly, and changes nothing", () => {
  for (const [key, row] of Object.entries(ACTIONS)) {
    it(key, async () => {
      const { fields } = await row.build(null);
      for (const principal of PRINCIPALS) {
        if (allowedFor(row, principal)) continue;
        const before = await allCounts();
        const cookie = cookieOf(principal) ?? undefined;
        const bearer = keyOf(principal);
        const answer = await callServerAction(key, fields, { cookie, headers: bearer ? { authorization: `Bearer ${bearer}` } : {} });
        if (!cookie) {
          // No session cookie (nobody, or a key, which actions do not take): the proxy sends the
          // request to sign-in before any action runs.
          expect({ principal, answer }).toMatchObject({ principal, answer: { kind: "other", status: 307, location: expect.stringMatching(/\/sign-in\?callbackUrl=/) } });
        } else {
          const { detail } = refusalOf(principal);
          expect({ principal, answer }).toEqual({ principal, answer: { kind: "state", status: 200, state: { status: "error", message: detail } } });
        }
        expect({ principal, counts: await allCounts() }).toEqual({ principal, counts: before });
      }
    });
  }
});

describe("pages: every refused visit is sent away or refused, and changes nothing", () => {
  for (const [key, row] of Object.entries(PAGES)) {
    it(key, async () => {
      for (const principal of PRINCIPALS) {
        const expected = expectedPage(row, principal);
        if (expected.status === 200) continue;
        const before = await allCounts();
        const { status, to } = await visit(principal, row.path());
        expect({ principal, status, to }).toEqual({ principal, ...expected });
        expect({ principal, counts: await allCounts() }).toEqual({ principal, counts: before });
      }
    });
  }
});

describe("route handlers: every allowed cell succeeds with the handler's own status", () => {
  for (const [key, row] of Object.entries(ROUTES)) {
    it(key, async () => {
      for (const principal of PRINCIPALS) {
        if (row.allowed !== "public" && !allowedFor(row, principal)) continue;
        const req = await row.build(audienceOf(principal));
        const res = await send(principal, req);
        const bytes = Buffer.from(await res.arrayBuffer());
        const text = bytes.toString("utf8");
        expect({ principal, status: res.status }, text.slice(0, 300)).toEqual({ principal, status: row.ok });
        // The public rows carry no data (the OpenAPI document names donor fields, describing routes).
        if (row.allowed !== "public" && (principal === "clinician" || principal === "valid LIS key")) {
          expect({ principal, leaks: donorLeaks(text) }).toEqual({ principal, leaks: [] });
        }
        // The admin may read a version's dossier but not donor-level data: no sheet but the
        // audit trail (which the admin reads by DESIGN.md's table) names a donor.
        if (principal === "admin" && res.headers.get("content-type")?.includes("spreadsheetml")) {
          expect({ principal, sheetsNamingDonors: await sheetsNamingDonors(bytes) }).toEqual({ principal, sheetsNamingDonors: [] });
        }
      }
    });
  }
});

describe("server actions: every allowed cell succeeds", () => {
  for (const [key, row] of Object.entries(ACTIONS)) {
    it(key, async () => {
      for (const principal of PRINCIPALS) {
        if (!allowedFor(row, principal)) continue;
        const { fields, cookie } = await row.build(audienceOf(principal));
        const answer: ActionAnswer = await callServerAction(key, fields, { cookie: cookie ?? cookieOf(principal) ?? undefined });
        if ("redirect" in row.ok) {
          expect({ principal, answer }).toMatchObject({ principal, answer: { kind: "redirect", location: expect.stringMatching(row.ok.redirect) } });
        } else {
          expect({ principal, answer }).toMatchObject({ principal, answer: { kind: "state", state: { status: "ok" } } });
        }
        if (principal === "clinician" && answer.kind === "state") expect(donorLeaks(JSON.stringify(answer.state))).toEqual([]);
      }
    });
  }
});

describe("pages: every allowed visit is served, and a clinician's pages carry no donor-level data", () => {
  for (const [key, row] of Object.entries(PAGES)) {
    it(key, async () => {
      for (const principal of PRINCIPALS) {
        if (expectedPage(row, principal).status !== 200) continue;
        const { status, text } = await visit(principal, row.path());
        expect({ principal, status }).toEqual({ principal, status: 200 });
        if (principal === "clinician" || (principal === "admin" && key === "/versions/[id]/record")) {
          expect({ principal, namesDonor: text.includes(DONOR_PREFIX) }).toEqual({ principal, namesDonor: false });
          expect(referenceRuns().filter((run) => text.includes(run))).toEqual([]);
        }
      }
    });
  }
});

describe("a director never signs off, returns, reviews or withdraws a version they drafted, revised or submitted", () => {
  const RULE = "(a director never signs off, returns or withdraws a version they drafted, revised or submitted)";
  let director: Person;
  beforeAll(async () => {
    director = await newPerson("director", "duty");
  });

  const as = (cookie: string, method: string, path: string, json?: unknown) =>
    fetch(`${BASE_URL}${path}`, {
      method,
      headers: { cookie, origin: BASE_URL, ...(json === undefined ? {} : { "content-type": "application/json" }) },
      body: json === undefined ? undefined : JSON.stringify(json),
    });
  const draftAs = async (cookie: string) =>
    asJson(
      await as(cookie, "POST", "/api/v1/interval-versions", { analyte: CODE, study: studyId, partitions: [{ estimate: estimateId, method: "nonparametric" }] }),
      201,
    ) as Promise<{ id: string; number: number }>;
  const move = (cookie: string, id: string, what: string, json?: unknown) => as(cookie, "POST", `/api/v1/interval-versions/${id}/${what}`, json);
  const signAs = (person: Person, id: string) => move(person.cookie, id, "sign", { password: PASSWORD, email: person.email, meaning: "approved_for_clinical_use" });

  // What a move may write (these run after the matrix's successes, whose deferred score-log
  // writes may still land, so the count is of the sign-off's own tables).
  const MOVE_TABLES = ["interval_versions", "interval_partitions", "signatures", "audit_events", "outbox", "signing_failures"];
  const moveCounts = async () =>
    Object.fromEntries(
      await Promise.all(MOVE_TABLES.map(async (t) => [t, (await pool.query(`SELECT count(*)::int AS n FROM ${t}`)).rows[0].n as number] as const)),
    );

  /** What the version page shows the person: the duty rule's note, and whether the signature panel is there. */
  async function versionPage(person: Person, id: string): Promise<{ duty: string | null; signPanel: boolean }> {
    const res = await fetch(`${BASE_URL}/versions/${id}`, { headers: { cookie: person.cookie } });
    expect(res.status).toBe(200);
    const html = await res.text();
    const duty = /data-testid="duty-rule"[^>]*>([^<]*)</.exec(html)?.[1] ?? null;
    return { duty, signPanel: html.includes('data-testid="signature-panel"') };
  }

  async function refused(res: Response, detail: string, before: Record<string, number>) {
    expect(await answerOf(res, false)).toEqual({ status: 403, detail });
    expect(await moveCounts()).toEqual(before);
  }

  it("refuses the director who drafted it, and lets another director sign", async () => {
    const v = await draftAs(director.cookie);
    await asJson(await move(people.scientist.cookie, v.id, "submit"), 200);
    const before = await moveCounts();
    await refused(await signAs(director, v.id), `You drafted and last revised version ${v.number} of ${CODE}: another director must sign it off ${RULE}.`, before);
    await refused(await move(director.cookie, v.id, "return", { comment: "x" }), `You drafted and last revised version ${v.number} of ${CODE}: another director must return it ${RULE}.`, before);
    expect((await asJson(await signAs(people.signer, v.id), 200)).state).toBe("in_force");
    await refused(
      await move(director.cookie, v.id, "withdraw", { password: PASSWORD, email: director.email, reason: "x" }),
      `You drafted and last revised version ${v.number} of ${CODE}: another director must withdraw it ${RULE}.`,
      await moveCounts(),
    );
    await refused(
      await move(director.cookie, v.id, "review", { password: PASSWORD, email: director.email, comment: "x" }),
      `You drafted and last revised version ${v.number} of ${CODE}: another director must review it ${RULE}.`,
      await moveCounts(),
    );
  });

  it("refuses the director who submitted it", async () => {
    const v = await draftAs(people.scientist.cookie);
    await asJson(await move(director.cookie, v.id, "submit"), 200);
    const before = await moveCounts();
    await refused(await signAs(director, v.id), `You submitted version ${v.number} of ${CODE}: another director must sign it off ${RULE}.`, before);
  });

  it("still refuses the director who submitted it after it was returned and submitted again by someone else", async () => {
    const v = await draftAs(people.scientist.cookie);
    await asJson(await move(director.cookie, v.id, "submit"), 200);
    await asJson(await move(people.signer.cookie, v.id, "return", { comment: "Matrix: add the method's lot." }), 200);
    await asJson(await move(people.scientist.cookie, v.id, "submit"), 200);
    const before = await moveCounts();
    await refused(await signAs(director, v.id), `You submitted version ${v.number} of ${CODE}: another director must sign it off ${RULE}.`, before);
    // The version page says so, and offers no signature.
    expect(await versionPage(director, v.id)).toEqual({ duty: "You submitted this version: another director must sign it off or return it.", signPanel: false });
  });

  it("still refuses the director who revised it after someone else revised it last", async () => {
    const v = await draftAs(people.scientist.cookie);
    await asJson(await as(director.cookie, "PATCH", `/api/v1/interval-versions/${v.id}`, { note: "Matrix: the director's revision." }), 200);
    await asJson(await as(people.scientist.cookie, "PATCH", `/api/v1/interval-versions/${v.id}`, { note: "Matrix: the scientist's revision." }), 200);
    await asJson(await move(people.scientist.cookie, v.id, "submit"), 200);
    const before = await moveCounts();
    await refused(await signAs(director, v.id), `You revised version ${v.number} of ${CODE}: another director must sign it off ${RULE}.`, before);
    expect(await versionPage(director, v.id)).toEqual({ duty: "You revised this version: another director must sign it off or return it.", signPanel: false });
    expect(await versionPage(people.signer, v.id)).toEqual({ duty: null, signPanel: true });
    expect((await asJson(await signAs(people.signer, v.id), 200)).state).toBe("in_force");
  });
});
