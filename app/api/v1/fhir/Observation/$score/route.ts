import { fhirErrorResponse, fhirResponse, readFhirJson } from "@/lib/api/fhir";
import { apiRoute } from "@/lib/api/handler";
import { MAX_FHIR_BODY_BYTES, scoreFhirBody } from "@/lib/scores/fhir-score";
import { outcomeOfStatus } from "@/lib/scoring/fhir";

export const dynamic = "force-dynamic";

/**
 * FHIR R4 operation $score on Observation: an Observation or a Bundle of them in, the same with
 * referenceRange, interpretation and the z-score and percentile components out. A session cookie
 * or an LIS key; every error, sign-in, role and rate limit included, is an OperationOutcome
 * (application/fhir+json).
 */
export const POST = apiRoute(
  { permission: "scores:create", lisKey: true, errorResponse: fhirErrorResponse },
  async ({ principal, request }) => scoreFhirBody({ body: await readFhirJson(request, MAX_FHIR_BODY_BYTES), principal }),
);

/** $score is an operation to POST to; anything else is told so in FHIR's terms. */
export function GET(): Response {
  return fhirResponse(outcomeOfStatus(405, "Use POST to run $score, with an Observation or a Bundle of Observations as the body."), 405, {
    allow: "POST",
  });
}

export { GET as PUT, GET as PATCH, GET as DELETE };
