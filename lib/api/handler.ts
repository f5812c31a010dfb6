import "server-only";
import type { z } from "zod";
import type { Caller } from "@/lib/auth/authorize";
import type { Principal } from "@/lib/auth/principal";
import type { Permission } from "@/lib/auth/roles";
import { env } from "@/lib/env";
import { bearerTokenOf } from "@/lib/lis/keys";
import { readBoundedBody, parseJsonBody, unstorableText, unstorableTextError } from "./body";
import { AppError } from "./errors";
import { crossSiteRefusal, originOf, STATE_CHANGING_METHODS } from "./origin";
import { resolvePrincipal } from "./principal";
import { problemResponse, toProblem, type Problem } from "./problem";

type RouteContext = { params: Promise<Record<string, string | string[] | undefined>> };

interface RouteConfig<P extends z.ZodType, Q extends z.ZodType, B extends z.ZodType, K extends boolean> {
  permission: Permission;
  /**
   * The route also answers LIS keys (`Authorization: Bearer <key>`): scores, in-force intervals,
   * FHIR, the analyte catalogue. On any other route a key is refused with 403. With a key the
   * handler's `caller` is null and `principal` names the LIS connection; its rate limit applies.
   */
  lisKey?: K;
  params?: P;
  query?: Q;
  body?: B;
  /** Largest accepted request body in bytes (default 1 MiB). */
  maxBodyBytes?: number;
  /**
   * Reads the body as multipart/form-data of at most this many bytes (the whole request, files
   * and fields) into `form`; another content type is answered 415, a larger body 413.
   */
  multipart?: { maxBytes: number; tooLarge?: string };
  /**
   * Answers an error in another shape than problem+json, from the same problem (status, detail,
   * headers): the FHIR routes answer every error, auth included, as an OperationOutcome.
   */
  errorResponse?: (problem: Problem, headers: Record<string, string>) => Response;
}

interface RouteInput<P, Q, B, K extends boolean = false> {
  /** The signed-in user; on a route with `lisKey: true`, null when an LIS key is calling. */
  caller: K extends true ? Caller | null : Caller;
  /** Who is calling: the user, or the LIS connection whose key was sent. */
  principal: Principal;
  /** The next-auth session's own id (token `sid`), e.g. for the first signature of a session. */
  sessionId: string | null;
  params: P;
  query: Q;
  body: B;
  /** The parsed form, for routes with the `multipart` option; otherwise null. */
  form: FormData | null;
  request: Request;
}

/** The media type of a Content-Type header, without parameters, in lower case (media types ignore case). */
function mediaTypeOf(request: Request): string {
  return (request.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
}

async function readJson(request: Request, maxBytes: number): Promise<unknown> {
  if (mediaTypeOf(request) !== "application/json") {
    throw new AppError("unsupported_media_type", "Send the request body as application/json.");
  }
  return parseJsonBody(await readBoundedBody(request, maxBytes));
}

/**
 * Reads a multipart/form-data body, refusing another type (415), more than `maxBytes` (413, with
 * `tooLarge` as the message when given) and a field or file name that cannot be stored as text (422).
 */
async function readMultipart(request: Request, { maxBytes, tooLarge }: { maxBytes: number; tooLarge?: string }): Promise<FormData> {
  const type = request.headers.get("content-type") ?? "";
  if (mediaTypeOf(request) !== "multipart/form-data") {
    throw new AppError("unsupported_media_type", "Send the request body as multipart/form-data.");
  }
  let bytes: Buffer<ArrayBuffer>;
  try {
    bytes = await readBoundedBody(request, maxBytes);
  } catch (err) {
    if (tooLarge && err instanceof AppError && err.code === "payload_too_large") throw new AppError("payload_too_large", tooLarge);
    throw err;
  }
  let form: FormData;
  try {
    form = await new Response(bytes, { headers: { "content-type": type } }).formData();
  } catch {
    throw new AppError("bad_request", "The request body is not valid multipart/form-data.");
  }
  for (const [name, value] of form) {
    const problem = typeof value === "string" ? unstorableText(value) : unstorableText(value.name);
    if (problem) throw unstorableTextError(name, typeof value === "string" ? problem : `the file name: ${problem}`);
  }
  return form;
}

/** Query parameters as an object, refusing (422) a value that cannot be stored or compared as text. */
function queryOf(url: URL): Record<string, string> {
  const query = Object.fromEntries(url.searchParams);
  for (const [name, value] of Object.entries(query)) {
    const problem = unstorableText(value) ?? unstorableText(name);
    if (problem) throw unstorableTextError(name, problem);
  }
  return query;
}

/**
 * Refuses (403) a state-changing request that the session cookie would authenticate when it comes
 * from another site (lib/api/origin.ts). A request with `Authorization: Bearer …` is decided by
 * its key alone (the cookie is ignored), so it is not checked.
 */
function refuseCrossSiteChange(request: Request): void {
  if (!STATE_CHANGING_METHODS.has(request.method)) return;
  if (bearerTokenOf(request.headers.get("authorization")) !== null) return;
  const refusal = crossSiteRefusal(request.headers, originOf(env().NEXTAUTH_URL));
  if (refusal !== null) throw new AppError("forbidden", refusal);
}

/**
 * The one wrapper for every route handler: refuses cross-site changes made with the session
 * cookie, resolves the caller (session, or an LIS key where `lisKey` allows it, within its rate
 * limit), checks the permission, parses params, query and body with zod, runs the handler, and
 * answers every error as application/problem+json. A handler returns a Response or a value to be
 * sent as JSON.
 */
export function apiRoute<
  P extends z.ZodType = z.ZodType<Record<string, never>>,
  Q extends z.ZodType = z.ZodType<Record<string, never>>,
  B extends z.ZodType = z.ZodType<undefined>,
  K extends boolean = false,
>(
  config: RouteConfig<P, Q, B, K>,
  handler: (input: RouteInput<z.output<P>, z.output<Q>, z.output<B>, K>) => Promise<unknown>,
) {
  return async (request: Request, context: RouteContext): Promise<Response> => {
    const url = new URL(request.url);
    try {
      refuseCrossSiteChange(request);
      const { principal, caller, sessionId } = await resolvePrincipal(request, { permission: config.permission, lisKey: config.lisKey });
      const params = config.params ? config.params.parse(await context.params) : {};
      const query = config.query ? config.query.parse(queryOf(url)) : {};
      const body = config.body ? config.body.parse(await readJson(request, config.maxBodyBytes ?? 1 << 20)) : undefined;
      const form = config.multipart ? await readMultipart(request, config.multipart) : null;
      const result = await handler({ caller, principal, sessionId, params, query, body, form, request } as RouteInput<
        z.output<P>,
        z.output<Q>,
        z.output<B>,
        K
      >);
      if (result instanceof Response) return result;
      return Response.json(result, { headers: { "cache-control": "no-store" } });
    } catch (err) {
      const problem = toProblem(err, url.pathname);
      const headers: Record<string, string> =
        problem.status === 401 ? { "www-authenticate": 'Bearer realm="bellwether"' } : {};
      return (config.errorResponse ?? problemResponse)(problem, headers);
    }
  };
}
