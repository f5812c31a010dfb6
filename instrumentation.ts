/**
 * Runs once when the server starts: a wrong or missing environment variable stops Bellwether
 * at start-up with a message naming it, rather than failing on the first request; and in the
 * Node.js runtime, so does a database connection it must not serve with (instrumentation-node.ts),
 * which then starts the scheduled mail jobs and loads the LIS connections.
 */
export async function register() {
  const { env } = await import("./lib/env");
  env();
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const { refuseUnsafeDatabase, startScheduledJobs, startLisState } = await import("./instrumentation-node");
    await refuseUnsafeDatabase();
    await startScheduledJobs();
    await startLisState();
  }
}
