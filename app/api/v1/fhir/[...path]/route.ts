import { fhirResponse } from "@/lib/api/fhir";
import { outcomeOfStatus } from "@/lib/scoring/fhir";

/** Any FHIR address Bellwether does not serve: a 404 OperationOutcome, as FHIR clients expect. */
function notFound(request: Request): Response {
  const { pathname } = new URL(request.url);
  return fhirResponse(outcomeOfStatus(404, `There is no FHIR endpoint at ${pathname}. Bellwether serves POST /api/v1/fhir/Observation/$score.`), 404);
}

export { notFound as GET, notFound as POST, notFound as PUT, notFound as PATCH, notFound as DELETE };
