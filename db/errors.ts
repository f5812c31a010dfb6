/**
 * The name of the unique index or constraint that a PostgreSQL unique_violation (23505) broke,
 * also when drizzle wraps the driver's error; null for any other error. The empty string when
 * the driver did not say which.
 */
export function uniqueViolationOf(err: unknown): string | null {
  for (let e: unknown = err; e && typeof e === "object"; e = (e as { cause?: unknown }).cause) {
    if ((e as { code?: unknown }).code === "23505") {
      const constraint = (e as { constraint?: unknown }).constraint;
      return typeof constraint === "string" ? constraint : "";
    }
  }
  return null;
}
