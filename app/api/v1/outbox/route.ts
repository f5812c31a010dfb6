import { db } from "@/db/client";
import { listOutboxMessages } from "@/db/queries/outbox";
import { apiRoute } from "@/lib/api/handler";
import { outboxQuery, type OutboxPage } from "@/lib/mail/outbox-query";

export const dynamic = "force-dynamic";

/** The e-mail outbox, newest first, a page at a time (administrators). */
export const GET = apiRoute({ permission: "users:manage", query: outboxQuery }, async ({ query: { page, pageSize } }): Promise<OutboxPage> => {
  const { rows, total } = await listOutboxMessages(db(), { limit: pageSize, offset: (page - 1) * pageSize });
  return {
    items: rows.map((m) => ({
      id: m.id,
      kind: m.kind,
      recipients: m.recipients,
      subject: m.subject,
      text: m.text,
      status: m.status,
      attempts: m.attempts,
      lastError: m.lastError,
      createdAt: m.createdAt.toISOString(),
      sentAt: m.sentAt?.toISOString() ?? null,
    })),
    total,
    page,
    pageSize,
  };
});
