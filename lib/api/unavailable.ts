/**
 * Recognises a failure to reach PostgreSQL (refused, reset, shut down, not yet accepting
 * connections), as opposed to a query the database refused. Such a request is answered 503 with
 * Retry-After: the caller should simply try again, and nothing was changed.
 */

/** Node socket errors and PostgreSQL SQLSTATEs (class 08 connection exception, 57P0x shutdown). */
const CONNECTION_CODES = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "ETIMEDOUT",
  "EPIPE",
  "EHOSTUNREACH",
  "ENOTFOUND",
  "57P01",
  "57P02",
  "57P03",
  "08000",
  "08001",
  "08003",
  "08004",
  "08006",
]);

const CONNECTION_MESSAGES = [/Connection terminated/i, /timeout exceeded when trying to connect/i, /Client has encountered a connection error/i, /connect ECONNREFUSED/i];

/** Seconds a caller is asked to wait when the database cannot be reached. */
export const DATABASE_RETRY_AFTER_SECONDS = 5;

/** True when `err` (or an error it wraps, as Drizzle does) says the database could not be reached. */
export function isDatabaseUnreachable(err: unknown): boolean {
  for (let e: unknown = err, depth = 0; e && depth < 5; depth++) {
    if (typeof e !== "object") return false;
    const { code, message, errors } = e as { code?: unknown; message?: unknown; errors?: unknown };
    if (typeof code === "string" && CONNECTION_CODES.has(code)) return true;
    if (typeof message === "string" && CONNECTION_MESSAGES.some((m) => m.test(message))) return true;
    // AggregateError from a connect that tried several addresses.
    if (Array.isArray(errors) && errors.some((inner) => isDatabaseUnreachable(inner))) return true;
    e = (e as { cause?: unknown }).cause;
  }
  return false;
}
