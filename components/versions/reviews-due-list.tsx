import Link from "next/link";
import { Badge } from "@/components/ui/badge";

export interface ReviewDueRow {
  versionId: string;
  analyte: string;
  number: number;
  reviewBy: string;
  /** "overdue by 3 days", "due in 12 days". */
  wording: string;
  overdue: boolean;
}

/** In-force versions due for review within 60 days or overdue, soonest first. */
export function ReviewsDueList({ rows }: { rows: ReviewDueRow[] }) {
  if (rows.length === 0) {
    return (
      <p className="text-sm text-ink-600" data-testid="reviews-due-empty">
        No interval version in force is due for review within 60 days.
      </p>
    );
  }
  return (
    <ul className="divide-y divide-ink-100 text-sm" data-testid="reviews-due">
      {rows.map((r) => (
        <li key={r.versionId} className="flex flex-wrap items-center justify-between gap-2 py-1.5">
          <Link href={`/versions/${r.versionId}`}>
            {r.analyte}, version {r.number}
          </Link>
          <span className="flex items-center gap-2">
            <span className="tabular-nums text-ink-600">review by {r.reviewBy}</span>
            <Badge tone={r.overdue ? "warn" : "neutral"}>{r.wording}</Badge>
          </span>
        </li>
      ))}
    </ul>
  );
}
