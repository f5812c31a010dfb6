import { assertSafeToServe } from "./db/preflight";
import { env } from "./lib/env";

/**
 * The checks before serving (db/preflight.ts), made by the server itself however it was started.
 * On failure the process exits: a throw here would leave Next answering every request with a 500.
 */
export async function refuseUnsafeDatabase(): Promise<void> {
  const settings = env();
  try {
    await assertSafeToServe(settings.DATABASE_URL, { demo: settings.BELLWETHER_DEMO });
  } catch (err) {
    console.error(`bellwether: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  }
}
