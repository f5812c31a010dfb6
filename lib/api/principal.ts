import "server-only";
import { authorize, type Caller } from "@/lib/auth/authorize";
import type { Principal } from "@/lib/auth/principal";
import type { Permission } from "@/lib/auth/roles";
import { currentSession } from "@/lib/auth/session";
import { bearerTokenOf, isWellFormedLisKey, sha256OfLisKey } from "@/lib/lis/keys";
import { lisRuntime } from "@/lib/lis/runtime";
import { AppError } from "./errors";

/** What an LIS key may do (DESIGN.md's roles table: read in-force intervals, score values). */
export const LIS_KEY_PERMISSIONS: readonly Permission[] = ["intervals:read", "scores:create"];

export const LIS_KEY_UNKNOWN_MESSAGE =
  "The API key was not recognised. Send the whole key as `Authorization: Bearer bwk_…`, or ask your Bellwether administrator for a new one.";
export const LIS_KEY_REVOKED_MESSAGE = "This API key has been revoked. Ask your Bellwether administrator for a new one.";
export const LIS_KEY_NOT_HERE_MESSAGE =
  "An LIS key may only score values and read the analyte catalogue and the intervals in force; this endpoint needs a person signed in to Bellwether.";

export interface ResolvedPrincipal {
  principal: Principal;
  /** The signed-in user; null for an LIS key. */
  caller: Caller | null;
  /** The next-auth session's id; null for an LIS key. */
  sessionId: string | null;
}

export interface ResolveOptions {
  /** The permission the route needs; none for "any signed-in person". */
  permission?: Permission;
  /** The route accepts LIS keys (`Authorization: Bearer <key>`). */
  lisKey?: boolean;
}

/**
 * Who is calling: an LIS key when the request carries `Authorization: Bearer …`, otherwise the
 * session cookie. Throws AppError: 401 for no session or an unknown, malformed or revoked key,
 * 403 for a role or for a key on a route that does not take keys, 429 (with `retryAfter`) when
 * the key's connection has used its rate limit. A key costs no database round trip: connections
 * are held in memory (lib/lis/runtime.ts). The key itself appears in no error and no log.
 */
export async function resolvePrincipal(request: Request, options: ResolveOptions = {}): Promise<ResolvedPrincipal> {
  const token = bearerTokenOf(request.headers.get("authorization"));
  if (token === null) {
    const session = await currentSession();
    const caller = authorize(session?.caller ?? null, options.permission);
    return { principal: { kind: "user", id: caller.id, role: caller.role }, caller, sessionId: session?.sessionId ?? null };
  }
  if (!isWellFormedLisKey(token)) throw new AppError("unauthenticated", LIS_KEY_UNKNOWN_MESSAGE);
  const runtime = lisRuntime();
  const connection = await runtime.keys.lookup(sha256OfLisKey(token));
  if (!connection) throw new AppError("unauthenticated", LIS_KEY_UNKNOWN_MESSAGE);
  if (connection.revoked) throw new AppError("unauthenticated", LIS_KEY_REVOKED_MESSAGE);
  if (!options.lisKey || (options.permission && !LIS_KEY_PERMISSIONS.includes(options.permission))) {
    throw new AppError("forbidden", LIS_KEY_NOT_HERE_MESSAGE);
  }
  const decision = runtime.limiter.take(connection.id, connection.ratePerMinute);
  if (!decision.admitted) {
    throw new AppError(
      "too_many_requests",
      `The LIS connection "${connection.name}" may make ${decision.limit.toLocaleString("en")} requests a minute and has used them; try again in ${decision.retryAfterSeconds} ${decision.retryAfterSeconds === 1 ? "second" : "seconds"}. Send many values in one request rather than one request per value.`,
      { retryAfter: decision.retryAfterSeconds },
    );
  }
  runtime.lastUsed.note(connection.id, Date.now());
  return { principal: { kind: "lis", id: connection.id, name: connection.name }, caller: null, sessionId: null };
}
