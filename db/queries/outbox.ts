import "server-only";
import { and, eq, inArray } from "drizzle-orm";
import type { Executor } from "../client";
import { outbox, users, type OutboxMessage, type Role } from "../schema";

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
