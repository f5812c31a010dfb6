import type { Metadata } from "next";
import Link from "next/link";
import { AuditEventList } from "@/components/audit/audit-event-list";
import { ReviewsDueList } from "@/components/versions/reviews-due-list";
import { Button } from "@/components/ui/button";
import { PageHeader, Panel } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listAuditEvents } from "@/db/queries/audit";
import { listReviewsDue } from "@/db/queries/outbox";
import { formatDate } from "@/lib/format";
import { REVIEW_WINDOW_DAYS, reviewDueWording } from "@/lib/versions/review-due";
import { requirePageCaller } from "@/lib/auth/session";
import { can, PERMISSION_DESCRIPTIONS, PERMISSIONS, ROLE_LABELS, type Permission } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Overview" };

export default async function OverviewPage() {
  const caller = await requirePageCaller();
  const permissions = (Object.keys(PERMISSIONS) as Permission[]).filter((p) => can(caller.role, p));
  const recent = can(caller.role, "audit:read")
    ? (await listAuditEvents(db(), { filter: {}, limit: 8, offset: 0 })).rows
    : null;
  const now = new Date();
  const reviewsDue = can(caller.role, "versions:sign")
    ? (await listReviewsDue(db(), { until: new Date(now.getTime() + REVIEW_WINDOW_DAYS * 86_400_000) })).map((v) => {
        const wording = reviewDueWording(v.reviewBy, now);
        return {
          versionId: v.versionId,
          analyte: `${v.analyteName} (${v.analyteCode})`,
          number: v.number,
          reviewBy: formatDate(v.reviewBy),
          wording: wording.long,
          overdue: wording.overdue,
        };
      })
    : null;

  return (
    <>
      <PageHeader
        title={`Welcome, ${caller.name}`}
        lead={`Signed in as ${ROLE_LABELS[caller.role].toLowerCase()}. Bellwether keeps the laboratory's reference intervals: how they were established, who signed them off, and how a patient value sits against them.`}
      />
      <div className="grid gap-5 lg:grid-cols-2">
        {caller.role === "clinician" ? (
          <Panel title="Score a patient value" className="lg:col-span-2">
            <form action="/score" method="get" role="search" aria-label="Find an analyte to score" className="flex flex-wrap items-end gap-3">
              <div className="min-w-0 flex-1 space-y-1">
                <label htmlFor="overview-analyte-search" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
                  Analyte
                </label>
                <input
                  id="overview-analyte-search"
                  name="q"
                  type="search"
                  autoComplete="off"
                  maxLength={64}
                  placeholder="e.g. potassium, K or 2823-3"
                  aria-describedby="overview-analyte-search-hint"
                  className="block w-full rounded-md border border-ink-300 bg-white px-2.5 py-1.5 text-sm text-ink-900 shadow-xs focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500"
                />
              </div>
              <Button type="submit">Find and score</Button>
            </form>
            <p id="overview-analyte-search-hint" className="mt-1 text-xs text-ink-500 [&_a]:underline">
              By name, code or LOINC code. Or open the <Link href="/intervals">intervals in force</Link>, or score a{" "}
              <Link href="/score?mode=panel">panel of several analytes</Link>.
            </p>
          </Panel>
        ) : null}
        {reviewsDue ? (
          <Panel title="Reviews coming due" className="lg:col-span-2">
            <ReviewsDueList rows={reviewsDue} />
          </Panel>
        ) : null}
        <Panel title="What your role can do">
          <ul className="space-y-2 text-sm" data-testid="role-abilities">
            {permissions.map((p) => (
              <li key={p} className="flex gap-2">
                <span aria-hidden className="mt-1.5 h-1.5 w-1.5 shrink-0 rounded-full bg-bronze-500" />
                {PERMISSION_DESCRIPTIONS[p]}
              </li>
            ))}
          </ul>
        </Panel>
        <Panel title="How to read Bellwether's numbers">
          <div className="space-y-2 text-sm text-ink-700">
            <p>
              A reference interval is the central 95% of results in healthy reference individuals. About one healthy
              person in twenty falls outside it by design, so a result outside the interval is a prompt to look, not a
              finding.
            </p>
            <p>
              z-scores and percentiles place a value among healthy reference individuals. They are statistics, not
              diagnoses, and they are read with the clinical picture under the laboratory director&apos;s licensed
              direction and local policy.
            </p>
          </div>
        </Panel>
        {recent ? (
          <Panel
            title="Recent activity"
            className="lg:col-span-2"
            actions={
              <Link href="/audit" className="text-sm">
                Full audit trail
              </Link>
            }
          >
            <AuditEventList events={recent} />
          </Panel>
        ) : null}
      </div>
    </>
  );
}
