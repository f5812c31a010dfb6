/**
 * Bellwether's OpenAPI 3.1 document, generated with zod-openapi from the zod schemas the route
 * handlers parse with (and, where a handler answers a shape with a schema, the answer's). Every
 * route under app/api/v1 is listed in lib/api/openapi-operations.ts; a test walks the route files
 * and fails on one that is missing. Served at GET /api/v1/openapi.json; it holds no secret.
 */
import { z } from "zod";
import { createDocument, type ZodOpenApiOperationObject, type ZodOpenApiPathsObject, type ZodOpenApiResponseObject } from "zod-openapi";
import type { oas31 } from "zod-openapi";
import packageJson from "@/package.json";
import { PERMISSIONS, type Permission } from "@/lib/auth/roles";
import { API_OPERATIONS, type ApiOperation, type ErrorStatus } from "./openapi-operations";

/** RFC 9457 problem details, as lib/api/problem.ts writes them. */
export const problemSchema = z
  .looseObject({
    type: z.string().meta({ description: "urn:bellwether:problem:<code>", example: "urn:bellwether:problem:invalid" }),
    title: z.string().meta({ example: "Invalid input" }),
    status: z.number().int().meta({ example: 422 }),
    detail: z.string().meta({ description: "What went wrong and what to do next, in plain words", example: "items: send at least one item" }),
    instance: z.string().optional().meta({ description: "The request's path", example: "/api/v1/scores" }),
    errors: z
      .array(z.object({ path: z.string(), message: z.string() }))
      .optional()
      .meta({ description: "Each invalid field (422)" }),
    retryAfter: z.number().optional().meta({ description: "Seconds to wait before trying again (429, 503); also the Retry-After header" }),
  })
  .meta({ id: "Problem", description: "application/problem+json (RFC 9457): every error outside FHIR" });

/** A FHIR R4 OperationOutcome: how the FHIR route answers every error. */
export const operationOutcomeSchema = z
  .looseObject({
    resourceType: z.literal("OperationOutcome"),
    issue: z.array(
      z.looseObject({
        severity: z.enum(["fatal", "error", "warning", "information"]),
        code: z.string().meta({ example: "invalid" }),
        diagnostics: z.string().optional(),
      }),
    ),
  })
  .meta({ id: "OperationOutcome", description: "FHIR R4 OperationOutcome" });

const retryAfterHeader = z.object({
  "Retry-After": z.string().meta({ description: "Whole seconds to wait before trying again", example: "1" }),
});

const ERROR_DESCRIPTIONS: Record<ErrorStatus, { id: string; description: string }> = {
  400: { id: "BadRequest", description: "The body is not valid JSON (or not a valid form)." },
  401: { id: "Unauthenticated", description: "No session and no key, or an unknown, malformed or revoked key." },
  403: { id: "Forbidden", description: "The caller's role (or an LIS key) may not do this, or a duty rule refuses it." },
  404: { id: "NotFound", description: "Nothing with that id or code." },
  405: { id: "MethodNotAllowed", description: "The method is not served at this address; the Allow header names the one that is." },
  409: { id: "Conflict", description: "A state rule refuses the change (e.g. a closed study, a version that is not a draft)." },
  413: { id: "PayloadTooLarge", description: "The body is larger than the route accepts, or holds too many items." },
  415: { id: "UnsupportedMediaType", description: "The body is not of the content type the route reads." },
  422: { id: "Invalid", description: "Invalid input: `detail` and `errors` name each field and what it must be." },
  429: { id: "TooManyRequests", description: "The LIS connection's rate limit is reached; wait Retry-After seconds." },
  503: { id: "Unavailable", description: "The database cannot be reached just now; nothing was changed. Retry after Retry-After seconds." },
};

const problemResponses = new Map<string, ZodOpenApiResponseObject>();

/** One response object per status and shape, registered once as a component and referenced. */
function problemResponse(status: ErrorStatus, fhir: boolean): ZodOpenApiResponseObject {
  const key = `${status}:${fhir}`;
  const known = problemResponses.get(key);
  if (known) return known;
  const response = problemResponseObject(status, fhir);
  problemResponses.set(key, response);
  return response;
}

function problemResponseObject(status: ErrorStatus, fhir: boolean): ZodOpenApiResponseObject {
  const { id, description } = ERROR_DESCRIPTIONS[status];
  const withRetry = status === 429 || status === 503;
  return {
    id: fhir ? `Fhir${id}` : id,
    description,
    ...(withRetry ? { headers: retryAfterHeader } : {}),
    content: fhir
      ? { "application/fhir+json": { schema: operationOutcomeSchema } }
      : { "application/problem+json": { schema: problemSchema } },
  };
}

function rolesSentence(permission: Permission, lisKey: boolean): string {
  const roles = PERMISSIONS[permission].join(", ");
  return `Allowed: ${roles}${lisKey ? ", and LIS keys (Authorization: Bearer)" : ""} (permission ${permission}).`;
}

/** The error statuses an operation can answer: from its access and inputs, plus those it names. */
export function errorStatusesOf(op: ApiOperation): ErrorStatus[] {
  if (op.notAllowed) return [405];
  const statuses = new Set<ErrorStatus>(op.errors ?? []);
  if (op.access !== "public") {
    statuses.add(401);
    statuses.add(403);
    statuses.add(503);
    if (op.access.lisKey) statuses.add(429);
  }
  if (op.params || op.query || op.body || op.multipart) statuses.add(422);
  if (op.body || op.multipart) {
    statuses.add(400);
    statuses.add(413);
    statuses.add(415);
  }
  return [...statuses].sort((a, b) => a - b);
}

function successResponse(op: ApiOperation): ZodOpenApiResponseObject {
  const content = op.success.content ?? [{ type: "application/json", schema: op.success.schema ?? z.looseObject({}) }];
  return {
    description: op.success.description,
    ...(op.success.headers ? { headers: op.success.headers } : {}),
    content: Object.fromEntries(content.map((c) => [c.type, { schema: c.schema, ...(c.example !== undefined ? { example: c.example } : {}) }])),
  };
}

function operationObject(op: ApiOperation): ZodOpenApiOperationObject {
  const access = op.access === "public" ? null : op.access;
  const isPublic = access === null;
  const lisKey = access?.lisKey === true;
  const description = [op.description ?? op.notAllowed, op.notAllowed ? null : access ? rolesSentence(access.permission, lisKey) : "No sign-in needed."]
    .filter(Boolean)
    .join("\n\n");

  const responses: ZodOpenApiOperationObject["responses"] = op.notAllowed ? {} : { [String(op.success.status)]: successResponse(op) };
  for (const status of errorStatusesOf(op)) responses[String(status) as `4${string}`] = problemResponse(status, op.fhirErrors === true);

  const requestBody: ZodOpenApiOperationObject["requestBody"] = op.body
    ? {
        required: true,
        content: Object.fromEntries(
          (op.bodyTypes ?? ["application/json"]).map((type) => [
            type,
            { schema: op.body!, ...(op.bodyExamples ? { examples: op.bodyExamples } : {}) },
          ]),
        ),
      }
    : op.multipart
      ? { required: true, content: { "multipart/form-data": { schema: op.multipart } } }
      : undefined;

  return {
    operationId: op.operationId,
    summary: op.summary,
    description,
    tags: [op.tag],
    security: isPublic ? [] : lisKey ? [{ sessionCookie: [] }, { bearerAuth: [] }] : [{ sessionCookie: [] }],
    ...(access ? { "x-bellwether-permission": access.permission } : {}),
    ...(op.params || op.query ? { requestParams: { ...(op.params ? { path: op.params } : {}), ...(op.query ? { query: op.query } : {}) } } : {}),
    ...(requestBody ? { requestBody } : {}),
    responses,
  };
}

const TAGS: oas31.TagObject[] = [
  { name: "Scoring", description: "Score patient values against the intervals in force (clinicians and LIS keys)." },
  { name: "FHIR", description: "FHIR R4 shapes of scoring; errors as OperationOutcome." },
  { name: "Analytes", description: "The analyte catalogue and each analyte's intervals in force." },
  { name: "Studies", description: "Healthy-donor studies: uploads, screening, exclusions, partitions, estimates (laboratory roles)." },
  { name: "Interval versions", description: "Drafting, sign-off, review and withdrawal of interval versions." },
  { name: "Adoption checks", description: "Verifying an interval the laboratory did not establish itself (CLSI EP28-A3c)." },
  { name: "Administration", description: "LIS connections, e-mail outbox, signing locks (administrators)." },
  { name: "Account", description: "Who is calling, and this document." },
];

/** Builds the document (pure; the route caches it). */
export function buildOpenApiDocument(): oas31.OpenAPIObject {
  const paths: ZodOpenApiPathsObject = {};
  for (const op of API_OPERATIONS) {
    paths[op.path] ??= {};
    (paths[op.path] as Record<string, ZodOpenApiOperationObject>)[op.method] = operationObject(op);
  }
  return createDocument({
    openapi: "3.1.0",
    info: {
      title: "Bellwether API",
      version: packageJson.version,
      description: [
        "Reference intervals and scoring for the clinical laboratory. Every capability of the app, with the same role checks.",
        "Authenticate with the session cookie of a signed-in browser, or, on the scoring, intervals, FHIR and analyte-reading routes, with an LIS connection's key: `Authorization: Bearer bwk_…`. A key on any other route is refused with 403.",
        "Errors are `application/problem+json` (RFC 9457) everywhere except the FHIR route, which answers FHIR's OperationOutcome. 429 and 503 carry `Retry-After`.",
        "The readable guide with copyable examples is the API page in the app (/api-docs).",
      ].join("\n\n"),
    },
    servers: [{ url: "/", description: "This Bellwether server" }],
    security: [{ sessionCookie: [] }],
    tags: TAGS,
    paths,
    components: {
      securitySchemes: {
        sessionCookie: {
          type: "apiKey",
          in: "cookie",
          name: "next-auth.session-token",
          description:
            "The session of a person signed in to Bellwether in a browser (named __Secure-next-auth.session-token over HTTPS). A POST, PUT, PATCH or DELETE made with it must come from Bellwether's own origin: one whose Origin header names another site, or that has no Origin and is marked Sec-Fetch-Site: cross-site or same-site, is refused with 403.",
        },
        bearerAuth: {
          type: "http",
          scheme: "bearer",
          bearerFormat: "bwk_ followed by 43 base64url characters",
          description: "An LIS connection's key, shown once when an administrator creates the connection. Accepted on scoring, intervals, FHIR and analyte-reading routes only.",
        },
      },
    },
  }) as oas31.OpenAPIObject;
}

const CACHE = Symbol.for("bellwether.openapi.document");
type CacheHolder = { [CACHE]?: oas31.OpenAPIObject };

/** The document, built once per process. */
export function openApiDocument(): oas31.OpenAPIObject {
  const holder = globalThis as CacheHolder;
  holder[CACHE] ??= buildOpenApiDocument();
  return holder[CACHE];
}
