import { z } from "zod";

const pageSizeMessage = "pageSize is a whole number from 1 to 200.";

/** The query of GET /api/v1/outbox. */
export const outboxQuery = z
  .object({
    page: z.coerce.number().int("page is a whole number from 1.").min(1, "page is a whole number from 1.").default(1),
    pageSize: z.coerce.number().int(pageSizeMessage).min(1, pageSizeMessage).max(200, pageSizeMessage).default(25),
  })
  .strict();

/** One message as GET /api/v1/outbox lists it. */
export interface OutboxItem {
  id: string;
  kind: string;
  recipients: string[];
  subject: string;
  text: string;
  status: "queued" | "sent" | "failed";
  attempts: number;
  lastError: string | null;
  createdAt: string;
  sentAt: string | null;
}

export interface OutboxPage {
  items: OutboxItem[];
  total: number;
  page: number;
  pageSize: number;
}
