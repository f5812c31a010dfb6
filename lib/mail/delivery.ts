import "server-only";
import type { Database } from "@/db/client";
import { recordAuditEvent, SYSTEM_ACTOR } from "@/db/queries/audit";
import { claimDueMessage, markMessageAttemptFailed, markMessageSent } from "@/db/queries/outbox";
import type { MailSender } from "./sender";

/** The time as the jobs see it: the real clock in the app, a fake one in tests. */
export type Clock = () => Date;

/** Attempts before a message is marked failed (it stays in the outbox, shown so to the admins). */
export const MAX_ATTEMPTS = 8;
const FIRST_RETRY_MS = 60_000;
const LONGEST_RETRY_MS = 6 * 60 * 60_000;

/**
 * How long to wait after the n-th failed attempt: 1, 2, 4, 8 … minutes, at most 6 hours
 * (exponential back-off, common practice).
 */
export function retryDelayMs(attempts: number): number {
  return Math.min(LONGEST_RETRY_MS, FIRST_RETRY_MS * 2 ** Math.max(0, attempts - 1));
}

export interface DeliveryOptions {
  database: Database;
  sender: MailSender;
  from: string;
  clock: Clock;
  maxAttempts?: number;
  /** At most this many messages per run; the next run takes the rest. */
  limit?: number;
  signal?: AbortSignal;
}

export interface DeliveryReport {
  sent: number;
  retrying: number;
  failed: number;
}

/**
 * Delivers the queued messages that are due. Each message is locked (FOR UPDATE SKIP LOCKED),
 * sent and marked in one transaction, so two runs at once (two app instances) never send one
 * message twice; a provider failure counts an attempt and schedules the next with back-off, and
 * after `maxAttempts` the message is marked failed. Nothing is ever deleted.
 */
export async function deliverDueMessages(options: DeliveryOptions): Promise<DeliveryReport> {
  const { database, sender, from, clock, maxAttempts = MAX_ATTEMPTS, limit = 50, signal } = options;
  const report: DeliveryReport = { sent: 0, retrying: 0, failed: 0 };
  for (let i = 0; i < limit && !signal?.aborted; i++) {
    const outcome = await database.transaction(async (tx) => {
      const message = await claimDueMessage(tx, { now: clock() });
      if (!message) return null;
      let result;
      try {
        result = await sender.send({
          from,
          to: message.recipients,
          subject: message.subject,
          text: message.text,
          html: message.html,
          idempotencyKey: message.id,
        });
      } catch (err) {
        result = { ok: false as const, error: err instanceof Error ? err.message : String(err) };
      }
      const now = clock();
      if (result.ok) {
        await markMessageSent(tx, { id: message.id, providerId: result.providerId, at: now });
        return "sent" as const;
      }
      const attempts = message.attempts + 1;
      const final = attempts >= maxAttempts;
      await markMessageAttemptFailed(tx, {
        id: message.id,
        attempts,
        error: result.error.slice(0, 1000),
        nextAttemptAt: new Date(now.getTime() + retryDelayMs(attempts)),
        final,
      });
      if (!final) return "retrying" as const;
      await recordAuditEvent(tx, {
        actor: SYSTEM_ACTOR,
        action: "outbox.failed",
        entityType: "outbox",
        entityId: message.id,
        summary: `E-mail "${message.subject}" to ${message.recipients.join(", ")} failed after ${attempts} attempts: ${result.error.slice(0, 300)}`,
        details: { kind: message.kind, attempts, lastError: result.error.slice(0, 1000) },
      });
      return "failed" as const;
    });
    if (outcome === null) break;
    report[outcome] += 1;
  }
  return report;
}
