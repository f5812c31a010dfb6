import { ZodError } from "zod";
import { StatsInputError } from "@/lib/stats/validate";
import { AppError } from "./errors";
import { DATABASE_RETRY_AFTER_SECONDS, isDatabaseUnreachable } from "./unavailable";

/** RFC 9457 problem details: the only error shape Bellwether's API answers with. */
export interface Problem {
  type: string;
  title: string;
  status: number;
  detail: string;
  instance?: string;
  errors?: { path: string; message: string }[];
  [extension: string]: unknown;
}

export function zodIssues(err: ZodError): { path: string; message: string }[] {
  return err.issues.map((i) => ({ path: i.path.map(String).join(".") || "(root)", message: i.message }));
}

/** Turns any thrown value into a problem; unknown errors are logged and answered generically. */
export function toProblem(err: unknown, instance?: string): Problem {
  if (err instanceof AppError) {
    return {
      type: `urn:bellwether:problem:${err.code}`,
      title: err.title,
      status: err.status,
      detail: err.message,
      instance,
      ...(err.details ?? {}),
    };
  }
  if (err instanceof ZodError) {
    const errors = zodIssues(err);
    return {
      type: "urn:bellwether:problem:invalid",
      title: "Invalid input",
      status: 422,
      detail: errors.map((e) => `${e.path}: ${e.message}`).join("; "),
      instance,
      errors,
    };
  }
  if (err instanceof StatsInputError) {
    // The engine's input checks speak to the person who sent the data: a 422, never a 500.
    return {
      type: "urn:bellwether:problem:invalid",
      title: "Invalid input",
      status: 422,
      detail: err.message,
      instance,
    };
  }
  if (isDatabaseUnreachable(err)) {
    return {
      type: "urn:bellwether:problem:unavailable",
      title: "Service unavailable",
      status: 503,
      detail: `The database cannot be reached just now; nothing was changed. Try again in ${DATABASE_RETRY_AFTER_SECONDS} seconds.`,
      instance,
      retryAfter: DATABASE_RETRY_AFTER_SECONDS,
    };
  }
  console.error("Unhandled error", err);
  return {
    type: "urn:bellwether:problem:internal",
    title: "Internal error",
    status: 500,
    detail: "Something went wrong on our side; the request changed nothing. Try again or tell your administrator.",
    instance,
  };
}

/**
 * The problem as an HTTP response. A problem with a numeric `retryAfter` (429, 503) also gets the
 * Retry-After header, in whole seconds.
 */
export function problemResponse(problem: Problem, headers?: Record<string, string>): Response {
  const all: Record<string, string> = { "content-type": "application/problem+json", "cache-control": "no-store", ...headers };
  if (typeof problem.retryAfter === "number") all["retry-after"] = String(Math.max(1, Math.ceil(problem.retryAfter)));
  return new Response(JSON.stringify(problem), { status: problem.status, headers: all });
}
