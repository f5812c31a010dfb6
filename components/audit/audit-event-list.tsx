import { formatDateTime } from "@/lib/format";

/** A compact, read-only list of audit events (newest first). */
export interface AuditEventItem {
  id: number;
  at: Date;
  summary: string;
}

export function AuditEventList({ events }: { events: AuditEventItem[] }) {
  if (events.length === 0) return <p className="text-sm text-ink-500">No events yet.</p>;
  return (
    <ol className="divide-y divide-ink-100 text-sm">
      {events.map((e) => (
        <li key={e.id} className="flex flex-wrap gap-x-3 py-1.5">
          <time dateTime={e.at.toISOString()} className="w-40 shrink-0 text-ink-500">
            {formatDateTime(e.at)}
          </time>
          <span className="text-ink-800">{e.summary}</span>
        </li>
      ))}
    </ol>
  );
}
