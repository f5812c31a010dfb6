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

/**
 * The app's scheduled mail work (lib/mail/scheduler.ts): delivery of the outbox every
 * BELLWETHER_MAIL_INTERVAL_SECONDS through Resend's SDK (at RESEND_BASE_URL when set), and the
 * daily review-due job. Without RESEND_API_KEY messages stay queued. Stopped on SIGTERM and
 * SIGINT before scripts/serve.ts closes the server. Then scoring's jobs, and the audit chain's
 * sealer (lib/audit/sealer.ts: links committed audit events once a second, and at shutdown).
 */
export async function startScheduledJobs(): Promise<void> {
  const settings = env();
  const [{ db }, { startMailJobs }, { resendSender }] = await Promise.all([
    import("./db/client"),
    import("./lib/mail/scheduler"),
    import("./lib/mail/sender"),
  ]);
  const sender = settings.RESEND_API_KEY ? resendSender({ apiKey: settings.RESEND_API_KEY, baseUrl: settings.RESEND_BASE_URL }) : null;
  if (!sender) console.error("bellwether: RESEND_API_KEY is not set: e-mail stays queued in the outbox");
  const jobs = startMailJobs({
    database: db(),
    sender,
    from: settings.MAIL_FROM,
    intervalMs: settings.BELLWETHER_MAIL_INTERVAL_SECONDS * 1000,
    appUrl: settings.NEXTAUTH_URL,
  });
  const stop = () => void jobs.stop();
  process.once("SIGTERM", stop);
  process.once("SIGINT", stop);
  await startScoringJobs();
  const { startAuditSealer } = await import("./lib/audit/sealer");
  startAuditSealer();
}

/**
 * Scoring's background work (lib/scores): the in-force interval cache loaded now and kept current
 * through LISTEN/NOTIFY, and the score log's once-a-second flush, which scripts/serve.ts runs a
 * last time at shutdown. A database that cannot be read now does not stop the server: the cache
 * loads on the first request instead.
 */
async function startScoringJobs(): Promise<void> {
  const [{ warmModelCache }, { startScoreLog }] = await Promise.all([import("./lib/scores/model-cache"), import("./lib/scores/score-log")]);
  startScoreLog();
  await warmModelCache().catch((err: unknown) => {
    console.error(`bellwether: the in-force intervals could not be loaded at start-up; they load on first use (${err instanceof Error ? err.message : String(err)})`);
  });
}

/**
 * The LIS connections and rate-limit counts each instance keeps in memory (lib/lis/runtime.ts),
 * loaded at start so that the first request with a key finds them ready; the last-used times are
 * written once more on SIGTERM and SIGINT. A database that is not there yet is not fatal: the
 * first keyed request loads them.
 */
export async function startLisState(): Promise<void> {
  const { startLisRuntime, stopLisRuntime } = await import("./lib/lis/runtime");
  await startLisRuntime().catch((err: unknown) =>
    console.error(`bellwether: the LIS connections could not be loaded yet: ${err instanceof Error ? err.message : String(err)}`),
  );
  const stop = () => void stopLisRuntime();
  process.once("SIGTERM", stop);
  process.once("SIGINT", stop);
}
