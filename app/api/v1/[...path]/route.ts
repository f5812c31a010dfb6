import { AppError } from "@/lib/api/errors";
import { problemResponse, toProblem } from "@/lib/api/problem";

/** Any address under /api/v1 that no handler serves: a problem+json 404, never an HTML page. */
function notFound(request: Request): Response {
  const { pathname } = new URL(request.url);
  return problemResponse(toProblem(new AppError("not_found", `There is no API endpoint at ${pathname}.`), pathname));
}

export { notFound as GET, notFound as POST, notFound as PUT, notFound as PATCH, notFound as DELETE };
