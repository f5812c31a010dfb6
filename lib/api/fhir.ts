/**
 * The HTTP side of Bellwether's FHIR routes: bodies read as FHIR JSON, answers as
 * application/fhir+json, and every error (the wrapper's own included: sign-in, role, rate limit,
 * database down) as an OperationOutcome instead of problem+json.
 */
import { FHIR_JSON, operationOutcome, outcomeOfStatus, issueTypeOfStatus } from "@/lib/scoring/fhir";
import { parseJsonBody, readBoundedBody } from "./body";
import { AppError } from "./errors";
import type { Problem } from "./problem";

/** A FHIR answer: JSON in FHIR's media type, never cached. */
export function fhirResponse(resource: unknown, status = 200, headers: Record<string, string> = {}): Response {
  return new Response(JSON.stringify(resource), {
    status,
    headers: { "content-type": `${FHIR_JSON}; charset=utf-8`, "cache-control": "no-store", ...headers },
  });
}

/**
 * `apiRoute`'s `errorResponse` for FHIR routes: the problem's status and headers (WWW-Authenticate,
 * Retry-After) with an OperationOutcome body; a problem listing fields gives one issue per field.
 */
export function fhirErrorResponse(problem: Problem, headers: Record<string, string>): Response {
  const all = { ...headers };
  if (typeof problem.retryAfter === "number") all["retry-after"] = String(Math.max(1, Math.ceil(problem.retryAfter)));
  const fields = Array.isArray(problem.errors) ? problem.errors : [];
  const outcome =
    fields.length > 0
      ? operationOutcome(
          fields.map((e) => ({ code: issueTypeOfStatus(problem.status), diagnostics: `${e.path}: ${e.message}`, expression: [e.path] })),
        )
      : outcomeOfStatus(problem.status, problem.detail);
  return fhirResponse(outcome, problem.status, all);
}

const ACCEPTED_TYPES = [FHIR_JSON, "application/json"];

/**
 * The request body as JSON, sent as application/fhir+json or application/json (415 otherwise),
 * of at most `maxBytes` (413 beyond, read no further than that), valid JSON (400 otherwise).
 */
export async function readFhirJson(request: Request, maxBytes: number): Promise<unknown> {
  const type = (request.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (!ACCEPTED_TYPES.includes(type)) {
    throw new AppError("unsupported_media_type", `Send the resource as ${FHIR_JSON} (or application/json); got ${type || "no content type"}.`);
  }
  return parseJsonBody(await readBoundedBody(request, maxBytes));
}
