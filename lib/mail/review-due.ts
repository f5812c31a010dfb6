import "server-only";
import type { Database } from "@/db/client";
import { activeAddressesOf, listReviewsDue, lockJob, messageQueuedSince, queueMessage } from "@/db/queries/outbox";
import { reviewDueWording, REVIEW_WINDOW_DAYS } from "@/lib/versions/review-due";
import type { Clock } from "./delivery";

const DAY_MS = 24 * 60 * 60_000;
export const REVIEW_DUE_KIND = "version.review_due";

/**
 * Queues a "version.review_due" message to the active directors for every in-force version due
 * for review within 60 days or overdue, once per version and review period: a message about the
 * version queued since its warning window opened (60 days before its review-by date) means it
 * was told already, so running daily, or on several instances at once, queues one message. A
 * review that sets the next review-by date opens a new window.
 */
export async function queueReviewDueMessages({
  database,
  clock,
  appUrl,
}: {
  database: Database;
  clock: Clock;
  /** The app's address, for a link in the message; the path alone without it. */
  appUrl?: string;
}): Promise<{ queued: number }> {
  return database.transaction(async (tx) => {
    await lockJob(tx, { name: "bellwether.review-due" });
    const now = clock();
    const due = await listReviewsDue(tx, { until: new Date(now.getTime() + REVIEW_WINDOW_DAYS * DAY_MS) });
    if (due.length === 0) return { queued: 0 };
    const directors = await activeAddressesOf(tx, { roles: ["director"] });
    let queued = 0;
    for (const version of due) {
      const windowOpened = new Date(version.reviewBy.getTime() - REVIEW_WINDOW_DAYS * DAY_MS);
      const told = await messageQueuedSince(tx, { kind: REVIEW_DUE_KIND, entityType: "interval_version", entityId: version.versionId, since: windowOpened });
      if (told) continue;
      const wording = reviewDueWording(version.reviewBy, now);
      const path = `/versions/${version.versionId}`;
      const link = appUrl ? `${appUrl.replace(/\/+$/, "")}${path}` : path;
      const row = await queueMessage(tx, {
        kind: REVIEW_DUE_KIND,
        recipients: directors,
        subject: `Review ${wording.short}: ${version.analyteName} (${version.analyteCode}) interval version ${version.number}`,
        text: [
          `The interval version ${version.number} of ${version.analyteName} (${version.analyteCode}) in force is due for review by ${version.reviewBy.toISOString().slice(0, 10)}: ${wording.long}.`,
          "",
          "A director confirms that it still fits by signing a review (meaning: reviewed, still valid), which sets the next review-by date; changing the limits needs a new version.",
          "",
          `Open the version: ${link}`,
          "",
          "Bellwether supports and does not replace the laboratory's licensed direction.",
        ].join("\n"),
        entityType: "interval_version",
        entityId: version.versionId,
        createdAt: now,
      });
      if (row) queued += 1;
    }
    return { queued };
  });
}
