/**
 * Runs once when the server starts: a wrong or missing environment variable stops Bellwether
 * at start-up with a message naming it, rather than failing on the first request; and so does a
 * database connection that must not be served with (db/preflight.ts), however the server was
 * started.
 */
export async function register() {
  const { env } = await import("./lib/env");
  const settings = env();
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { assertSafeToServe } = await import("./db/preflight");
  try {
    await assertSafeToServe(settings.DATABASE_URL, { demo: settings.BELLWETHER_DEMO });
  } catch (err) {
    // Throwing here would leave Next answering every request with a 500; refuse to run instead.
    console.error(err instanceof Error ? err.message : String(err));
    process.exit(1);
  }
}
