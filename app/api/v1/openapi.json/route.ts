import { openApiDocument } from "@/lib/api/openapi";
import { problemResponse, toProblem } from "@/lib/api/problem";

export const dynamic = "force-dynamic";

/**
 * The OpenAPI 3.1 document of this API, for anyone: it describes the routes and holds no secret.
 * Not an apiRoute, which always asks for a caller: like the health check, it needs none.
 */
export function GET(request: Request): Response {
  try {
    return Response.json(openApiDocument(), { headers: { "cache-control": "public, max-age=300" } });
  } catch (err) {
    return problemResponse(toProblem(err, new URL(request.url).pathname));
  }
}
