import Link from "next/link";
import type { ReactNode } from "react";
import { Badge } from "@/components/ui/badge";
import type { VersionReviewView as VersionReview } from "./types";
import { formatDate, formatDateTime } from "@/lib/format";
import { VERSION_STATE_LABELS } from "@/lib/versions/state-machine";

const TONE = { draft: "neutral", awaiting_signoff: "warn", in_force: "ok", superseded: "off", withdrawn: "off" } as const;

/** The version's state in words; a draft that a director sent back says so. */
export function versionStateWords(review: Pick<VersionReview, "version">): string {
  const v = review.version;
  return v.state === "draft" && v.returnComment ? "Returned to draft" : VERSION_STATE_LABELS[v.state];
}

/** The version's header: analyte, number, state, who drafted and moved it, and its records. */
export function VersionHeader({ review, actions }: { review: VersionReview; actions?: ReactNode }) {
  const { version: v, people, analyte } = review;
  const facts: [string, string][] = [
    ["Drafted", `${formatDateTime(v.createdAt)}${v.createdBy ? ` by ${v.createdBy.name}` : ""}`],
  ];
  if (v.submittedAt) facts.push(["Submitted", `${formatDateTime(v.submittedAt)}${people.submittedBy ? ` by ${people.submittedBy.name}` : ""}`]);
  if (people.returnedAt) facts.push(["Last returned", `${formatDateTime(people.returnedAt)}${people.returnedBy ? ` by ${people.returnedBy.name}` : ""}`]);
  if (v.effectiveFrom) facts.push(["In force", `from ${formatDateTime(v.effectiveFrom)}${v.effectiveTo ? ` to ${formatDateTime(v.effectiveTo)}` : ""}`]);
  if (people.reviewBy) facts.push(["Review by", `${formatDate(people.reviewBy)}${v.state === "in_force" && people.reviewBy < new Date() ? " (overdue)" : ""}`]);
  if (people.withdrawnAt) facts.push(["Withdrawn", `${formatDateTime(people.withdrawnAt)}${people.withdrawnBy ? ` by ${people.withdrawnBy.name}` : ""}: ${people.withdrawnReason ?? ""}`]);
  facts.push(["Critical limits", `${v.criticalLow ?? "none"} low, ${v.criticalHigh ?? "none"} high (${v.unit})`]);
  if (v.note) facts.push(["Note", v.note]);
  return (
    <header className="mb-5 space-y-3">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <p className="text-sm text-ink-600">
            <span className="font-mono font-semibold text-ink-900">{analyte.code}</span> · {analyte.name} · in <span className="font-mono">{v.unit}</span>
          </p>
          <h1 className="mt-0.5">
            Version {v.number} of {analyte.code}
          </h1>
          <p className="mt-1">
            <Badge tone={TONE[v.state]}>
              <span data-testid="version-state">{versionStateWords(review)}</span>
            </Badge>
          </p>
        </div>
        {actions}
      </div>
      {v.state === "draft" && v.returnComment ? (
        <p role="status" className="rounded-md border border-signal-warn/40 bg-amber-50 px-3 py-2 text-sm text-ink-800" data-testid="return-comment">
          Returned{people.returnedBy ? ` by ${people.returnedBy.name}` : ""}: {v.returnComment}
        </p>
      ) : null}
      <dl className="grid gap-x-6 gap-y-1 text-sm md:grid-cols-[auto_1fr]">
        {facts.map(([k, val]) => (
          <div key={k} className="contents">
            <dt className="text-ink-500">{k}</dt>
            <dd className="text-ink-800">{val}</dd>
          </div>
        ))}
      </dl>
    </header>
  );
}

/** Links to the version's printable record and its dossier. */
export function VersionRecordLinks({ versionId }: { versionId: string }) {
  return (
    <div className="flex flex-wrap gap-2 text-sm print:hidden">
      <Link href={`/versions/${versionId}/record`} className="rounded-md border border-ink-300 bg-white px-3 py-1.5 font-medium text-ink-800 hover:bg-ink-100">
        Sign-off record
      </Link>
      <a href={`/api/v1/interval-versions/${versionId}/dossier`} download className="rounded-md border border-ink-300 bg-white px-3 py-1.5 font-medium text-ink-800 hover:bg-ink-100" data-testid="dossier-link">
        Download dossier (XLSX)
      </a>
    </div>
  );
}
