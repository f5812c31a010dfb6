import "server-only";
import type { z } from "zod";
import { currentCaller } from "@/lib/auth/session";
import { authorize, type Caller } from "@/lib/auth/authorize";
import type { Permission } from "@/lib/auth/roles";
import { AppError } from "./errors";
import { problemResponse, toProblem } from "./problem";

type RouteContext = { params: Promise<Record<string, string | string[] | undefined>> };

interface RouteConfig<P extends z.ZodType, Q extends z.ZodType, B extends z.ZodType> {
  permission: Permission;
  params?: P;
  query?: Q;
  body?: B;
  /** Largest accepted request body in bytes (default 1 MiB). */
  maxBodyBytes?: number;
}

interface RouteInput<P, Q, B> {
  caller: Caller;
  params: P;
  query: Q;
  body: B;
  request: Request;
}

/** Resolves who is calling: the session cookie (LIS keys join here with their issue). */
async function resolveCaller(): Promise<Caller | null> {
  return currentCaller();
}

async function readJson(request: Request, maxBytes: number): Promise<unknown> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.includes("application/json")) {
    throw new AppError("unsupported_media_type", "Send the request body as application/json.");
  }
  const text = await request.text();
  if (Buffer.byteLength(text) > maxBytes) {
    throw new AppError("payload_too_large", `The request body is larger than ${maxBytes} bytes.`);
  }
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
}

/**
 * The one wrapper for every route handler: resolves the caller, checks the permission, parses
 * params, query and body with zod, runs the handler, and answers every error as
 * application/problem+json. A handler returns a Response or a value to be sent as JSON.
 */
export function apiRoute<
  P extends z.ZodType = z.ZodType<Record<string, never>>,
  Q extends z.ZodType = z.ZodType<Record<string, never>>,
  B extends z.ZodType = z.ZodType<undefined>,
>(
  config: RouteConfig<P, Q, B>,
  handler: (input: RouteInput<z.output<P>, z.output<Q>, z.output<B>>) => Promise<unknown>,
) {
  return async (request: Request, context: RouteContext): Promise<Response> => {
    const url = new URL(request.url);
    try {
      const caller = authorize(await resolveCaller(), config.permission);
      const params = config.params ? config.params.parse(await context.params) : {};
      const query = config.query ? config.query.parse(Object.fromEntries(url.searchParams)) : {};
      const body = config.body ? config.body.parse(await readJson(request, config.maxBodyBytes ?? 1 << 20)) : undefined;
      const result = await handler({ caller, params, query, body, request } as RouteInput<
        z.output<P>,
        z.output<Q>,
        z.output<B>
      >);
      if (result instanceof Response) return result;
      return Response.json(result, { headers: { "cache-control": "no-store" } });
    } catch (err) {
      const problem = toProblem(err, url.pathname);
      const headers: Record<string, string> =
        problem.status === 401 ? { "www-authenticate": 'Bearer realm="bellwether"' } : {};
      return problemResponse(problem, headers);
    }
  };
}
