import "server-only";
import type { Database } from "@/db/client";
import { deliverDueMessages, type Clock } from "./delivery";
import { queueReviewDueMessages } from "./review-due";
import type { MailSender } from "./sender";
import { isDatabaseUnreachable } from "@/lib/api/unavailable";

export interface MailJobs {
  /** One pass: delivery, and the review-due job when the day changed since its last run. */
  tick(): Promise<void>;
  /** Stops the interval and waits for a pass in progress to end. */
  stop(): Promise<void>;
}

/**
 * The app's scheduled mail work: every `intervalMs` it delivers due messages (when a sender is
 * configured) and, once a day (the first pass of each UTC day), runs the review-due job. Passes
 * never overlap; a failing pass is logged and the next one tries again.
 */
export function startMailJobs({
  database,
  sender,
  from,
  clock = () => new Date(),
  intervalMs,
  appUrl,
  log = (line) => console.error(line),
}: {
  database: Database;
  sender: MailSender | null;
  from: string;
  clock?: Clock;
  intervalMs: number;
  appUrl?: string;
  log?: (line: string) => void;
}): MailJobs {
  const stopping = new AbortController();
  let lastReviewDay: string | null = null;
  let running: Promise<void> | null = null;
  let databaseAway = false;

  const pass = async () => {
    const today = clock().toISOString().slice(0, 10);
    if (today !== lastReviewDay) {
      try {
        const { queued } = await queueReviewDueMessages({ database, clock, appUrl });
        lastReviewDay = today;
        if (queued > 0) log(`bellwether: queued ${queued} review-due message${queued === 1 ? "" : "s"}`);
      } catch (err) {
        log(`bellwether: the review-due job failed (tried again on the next pass): ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    if (sender && !stopping.signal.aborted) {
      try {
        await deliverDueMessages({ database, sender, from, clock, signal: stopping.signal });
        if (databaseAway) log("bellwether: the database is back; mail delivery goes on");
        databaseAway = false;
      } catch (err) {
        // An outage fails every pass: said once, not once a pass (BELLWETHER_MAIL_INTERVAL_SECONDS).
        if (!isDatabaseUnreachable(err)) log(`bellwether: mail delivery failed (tried again on the next pass): ${err instanceof Error ? err.message : String(err)}`);
        else if (!databaseAway) log(`bellwether: the database cannot be reached; mail stays queued until it returns (${err instanceof Error ? err.message : String(err)})`);
        databaseAway = databaseAway || isDatabaseUnreachable(err);
      }
    }
  };

  const tick = () => {
    if (stopping.signal.aborted) return Promise.resolve();
    running ??= pass().finally(() => {
      running = null;
    });
    return running;
  };

  const timer = setInterval(() => void tick(), intervalMs);
  // The interval never keeps the process alive on its own.
  timer.unref();
  void tick();

  return {
    tick,
    async stop() {
      stopping.abort();
      clearInterval(timer);
      await running;
    },
  };
}
