import type { Metadata } from "next";
import Link from "next/link";
import { z } from "zod";
import { AuditFilters } from "@/components/audit/audit-filters";
import { AuditTable } from "@/components/audit/audit-table";
import { PageHeader, Panel } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listAuditEvents, listAuditVocabulary } from "@/db/queries/audit";
import { formatDateTime } from "@/lib/format";
import { requirePageCaller } from "@/lib/auth/session";
import { parseDayRange, startOfDay, startOfNextDay } from "@/lib/date-range";

export const metadata: Metadata = { title: "Audit trail" };

const PAGE_SIZE = 50;

// A NUL cannot be in any stored text, and PostgreSQL refuses it in a pattern: such a filter is dropped like any malformed one.
const text = z
  .string()
  .trim()
  .max(200)
  .refine((s) => !s.includes("\u0000"))
  .optional()
  .catch(undefined);
// Days are read strictly by parseDayRange, which reports what is wrong with them.
const day = z.string().trim().max(40).optional().catch(undefined);

const filterSchema = z.object({
  actor: text,
  action: text,
  entityType: text,
  text,
  from: day,
  to: day,
  page: z.coerce.number().int().min(1).max(100_000).catch(1),
});

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await requirePageCaller("audit:read");
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v || undefined]));
  const f = filterSchema.parse(raw);
  const range = parseDayRange({ from: f.from, to: f.to });
  const dateErrors = Object.values(range.errors);
  const filter = {
    actor: f.actor,
    action: f.action,
    entityType: f.entityType,
    text: f.text,
    from: range.from ? startOfDay(range.from) : undefined,
    // "to" is the last day shown, inclusive.
    to: range.to ? startOfNextDay(range.to) : undefined,
  };
  const database = db();
  const [{ rows, total }, vocabulary] = await Promise.all([
    dateErrors.length > 0
      ? { rows: [], total: 0 }
      : listAuditEvents(database, { filter, limit: PAGE_SIZE, offset: (f.page - 1) * PAGE_SIZE }),
    listAuditVocabulary(database),
  ]);
  const pages = Math.max(1, Math.ceil(total / PAGE_SIZE));
  const pageHref = (page: number) => {
    const params = new URLSearchParams(Object.entries({ ...raw, page: String(page) }).filter(([, v]) => v) as [string, string][]);
    return `/audit?${params.toString()}`;
  };

  return (
    <>
      <PageHeader
        title="Audit trail"
        lead="Every sign-in, change and signature, in the order it happened. The database refuses to alter or erase these records."
      />
      <Panel className="mb-5">
        <AuditFilters values={f} errors={range.errors} actions={vocabulary.actions} entityTypes={vocabulary.entityTypes} />
      </Panel>
      {dateErrors.length > 0 ? (
        <Panel>
          <div role="alert" data-testid="audit-date-error" className="space-y-1 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high">
            {dateErrors.map((message) => (
              <p key={message}>{message}</p>
            ))}
            <p>Correct the dates above and apply the filters again to see events.</p>
          </div>
        </Panel>
      ) : (
      <Panel title={`${total} event${total === 1 ? "" : "s"}`}>
        <AuditTable
          rows={rows.map((e) => ({
            id: e.id,
            at: formatDateTime(e.at),
            actor: e.actorLabel,
            action: e.action,
            entity: e.entityId ? `${e.entityType} ${e.entityId.slice(0, 8)}` : e.entityType,
            summary: e.summary,
          }))}
        />
        <nav aria-label="Pages" className="mt-3 flex items-center gap-3 text-sm">
          {f.page > 1 ? <Link href={pageHref(f.page - 1)}>← Newer</Link> : null}
          <span className="text-ink-500">
            Page {Math.min(f.page, pages)} of {pages}
          </span>
          {f.page < pages ? <Link href={pageHref(f.page + 1)}>Older →</Link> : null}
        </nav>
      </Panel>
      )}
    </>
  );
}
