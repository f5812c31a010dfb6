import "server-only";
import { and, asc, desc, eq, gte, inArray, isNull, lte, sql } from "drizzle-orm";
import type { Executor } from "../client";
import { analytes, intervalVersions, lisConnections, outbox, users, type OutboxMessage, type Role } from "../schema";

export type { OutboxMessage };

export interface QueuedMessage {
  /** What the message is about: "version.submitted", "version.returned", "signing.locked", … */
  kind: string;
  recipients: string[];
  subject: string;
  text: string;
  html?: string | null;
  entityType?: string | null;
  entityId?: string | null;
  /** When it was queued, for jobs that run on a given clock (the review-due job); default now. */
  createdAt?: Date;
}

/**
 * Queues an e-mail in the transaction of the change it reports; the delivery job sends it
 * afterwards, with retries. A message without recipients is not queued (nothing to deliver).
 */
export async function queueMessage(executor: Executor, message: QueuedMessage): Promise<OutboxMessage | null> {
  const recipients = [...new Set(message.recipients.map((r) => r.trim().toLowerCase()).filter(Boolean))];
  if (recipients.length === 0) return null;
  const [row] = await executor
    .insert(outbox)
    .values({
      kind: message.kind,
      recipients,
      subject: message.subject,
      text: message.text,
      html: message.html ?? null,
      entityType: message.entityType ?? null,
      entityId: message.entityId ?? null,
      ...(message.createdAt ? { createdAt: message.createdAt } : {}),
    })
    .returning();
  return row;
}

/** The e-mail addresses of the active users holding any of the roles, for a message to them. */
export async function activeAddressesOf(executor: Executor, { roles }: { roles: readonly Role[] }): Promise<string[]> {
  const rows = await executor
    .select({ email: users.email })
    .from(users)
    .where(and(eq(users.active, true), inArray(users.role, [...roles])));
  return rows.map((r) => r.email);
}

/**
 * The contact e-mails of the LIS connections that are not revoked, each address once (lower-case,
 * sorted): several connections may share a contact.
 */
export async function activeLisContactAddresses(executor: Executor): Promise<string[]> {
  const rows = await executor.select({ email: lisConnections.contactEmail }).from(lisConnections).where(isNull(lisConnections.revokedAt));
  return [...new Set(rows.map((r) => r.email.trim().toLowerCase()).filter(Boolean))].sort();
}

/**
 * Queues one message per address (each its own outbox row), for recipients who must not see each
 * other's addresses, such as the contacts of different LIS connections.
 */
export async function queueMessageToEach(executor: Executor, message: QueuedMessage): Promise<OutboxMessage[]> {
  const recipients = [...new Set(message.recipients.map((r) => r.trim().toLowerCase()).filter(Boolean))];
  if (recipients.length === 0) return [];
  return executor
    .insert(outbox)
    .values(
      recipients.map((recipient) => ({
        kind: message.kind,
        recipients: [recipient],
        subject: message.subject,
        text: message.text,
        html: message.html ?? null,
        entityType: message.entityType ?? null,
        entityId: message.entityId ?? null,
        ...(message.createdAt ? { createdAt: message.createdAt } : {}),
      })),
    )
    .returning();
}

/** A page of the outbox, newest first, with the total count. */
export async function listOutboxMessages(executor: Executor, { limit, offset }: { limit: number; offset: number }) {
  const [rows, [{ total }]] = await Promise.all([
    executor.select().from(outbox).orderBy(desc(outbox.createdAt), desc(outbox.id)).limit(limit).offset(offset),
    executor.select({ total: sql<number>`count(*)::int` }).from(outbox),
  ]);
  return { rows, total };
}

/**
 * Locks the oldest queued message that is due at `now`, skipping any another delivery run holds
 * (FOR UPDATE SKIP LOCKED): several app instances never pick the same message. Call it inside a
 * transaction that ends once the message is marked.
 */
export async function claimDueMessage(tx: Executor, { now }: { now: Date }): Promise<OutboxMessage | null> {
  const [row] = await tx
    .select()
    .from(outbox)
    .where(and(eq(outbox.status, "queued"), lte(outbox.nextAttemptAt, now)))
    .orderBy(asc(outbox.nextAttemptAt), asc(outbox.createdAt))
    .limit(1)
    .for("update", { skipLocked: true });
  return row ?? null;
}

/** The provider accepted the message. */
export async function markMessageSent(tx: Executor, { id, providerId, at }: { id: string; providerId: string; at: Date }): Promise<void> {
  await tx
    .update(outbox)
    .set({ status: "sent", providerId, sentAt: at, attempts: sql`${outbox.attempts} + 1`, lastError: null })
    .where(eq(outbox.id, id));
}

/** A failed attempt: still queued, next tried at `nextAttemptAt`; or failed for good when `final`. */
export async function markMessageAttemptFailed(
  tx: Executor,
  { id, attempts, error, nextAttemptAt, final }: { id: string; attempts: number; error: string; nextAttemptAt: Date; final: boolean },
): Promise<void> {
  await tx
    .update(outbox)
    .set({ status: final ? "failed" : "queued", attempts, lastError: error, nextAttemptAt })
    .where(eq(outbox.id, id));
}

/**
 * The date an in-force version is due for review: its review-by date, or (for a version put in
 * force before review-by dates were kept) its effective date plus the analyte's review period.
 */
const dueDate = sql<Date>`coalesce(${intervalVersions.reviewBy}, ${intervalVersions.effectiveFrom} + make_interval(months => ${analytes.reviewMonths}))`.mapWith(
  intervalVersions.reviewBy,
);

export interface ReviewDue {
  versionId: string;
  number: number;
  analyteCode: string;
  analyteName: string;
  reviewBy: Date;
}

/** In-force versions due for review on or before `until` (overdue ones included), soonest first. */
export async function listReviewsDue(executor: Executor, { until }: { until: Date }): Promise<ReviewDue[]> {
  const rows = await executor
    .select({
      versionId: intervalVersions.id,
      number: intervalVersions.number,
      analyteCode: analytes.code,
      analyteName: analytes.name,
      reviewBy: dueDate,
    })
    .from(intervalVersions)
    .innerJoin(analytes, eq(analytes.id, intervalVersions.analyteId))
    .where(and(eq(intervalVersions.state, "in_force"), lte(dueDate, until)))
    .orderBy(asc(dueDate), asc(analytes.code));
  return rows.filter((r): r is ReviewDue => r.reviewBy instanceof Date);
}

/** Whether a message of this kind about this entity was queued at or after `since`. */
export async function messageQueuedSince(
  executor: Executor,
  { kind, entityType, entityId, since }: { kind: string; entityType: string; entityId: string; since: Date },
): Promise<boolean> {
  const [row] = await executor
    .select({ id: outbox.id })
    .from(outbox)
    .where(and(eq(outbox.kind, kind), eq(outbox.entityType, entityType), eq(outbox.entityId, entityId), gte(outbox.createdAt, since)))
    .limit(1);
  return row !== undefined;
}

/** Serialises one job across app instances for the rest of the transaction. */
export async function lockJob(tx: Executor, { name }: { name: string }): Promise<void> {
  await tx.execute(sql`SELECT pg_advisory_xact_lock(hashtext(${name}))`);
}
