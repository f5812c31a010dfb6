/**
 * Runs once when the server starts: a wrong or missing environment variable stops Bellwether
 * at start-up with a message naming it, rather than failing on the first request.
 */
export async function register() {
  const { env } = await import("./lib/env");
  env();
}
