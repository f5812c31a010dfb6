import type { Metadata } from "next";
import Link from "next/link";
import type { ReactNode } from "react";
import { SimpleTable } from "@/components/ui/simple-table";
import { limitsText, ciText, fixed, METHOD_WORDS } from "@/components/versions/numbers";
import { LmsPartitionsCurves } from "@/components/versions/lms-partition";
import { PrintButton } from "@/components/versions/print-button";
import { SignatureList } from "@/components/versions/signature-list";
import { versionStateWords } from "@/components/versions/version-header";
import { db } from "@/db/client";
import { readAuditChainHead } from "@/db/queries/audit";
import { getLaboratoryName } from "@/db/queries/laboratory";
import { can } from "@/lib/auth/roles";
import { requirePageCaller } from "@/lib/auth/session";
import { formatDate, formatDateTime } from "@/lib/format";
import { lmsScopeLabel } from "@/lib/scoring/lms-curves-view";
import { scopeLabel } from "@/lib/versions/comparison";
import { recentScoresSentences } from "@/lib/versions/recent-scores";
import { loadVersionReview } from "../../../../(lab)/versions/[id]/load";

export const metadata: Metadata = { title: "Sign-off record" };

function RecordSection({ title, first = false, children }: { title: string; first?: boolean; children: ReactNode }) {
  return (
    <section className={`record-section space-y-3 border-t border-ink-200 pt-4 ${first ? "" : "print:break-before-page"}`}>
      <h2>{title}</h2>
      {children}
    </section>
  );
}

function Facts({ rows }: { rows: [string, ReactNode][] }) {
  return (
    <dl className="grid grid-cols-[auto_1fr] gap-x-6 gap-y-1 text-sm">
      {rows.map(([k, v]) => (
        <div key={k} className="contents">
          <dt className="text-ink-500">{k}</dt>
          <dd className="break-words text-ink-900">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

/**
 * The printable sign-off record of one version, for the laboratory's files: the version, its
 * evidence in brief, and the signature block (name, time, meaning, content SHA-256). Printed
 * without the sidebar, each section on its own page (app/globals.css, print rules).
 */
export default async function VersionRecordPage({ params }: { params: Promise<{ id: string }> }) {
  const caller = await requirePageCaller("dossiers:read");
  const { id } = await params;
  const review = await loadVersionReview(id, { donorLevel: can(caller.role, "donors:read") });
  const { version: v, people, comparison, study, analyte } = review;
  const d = v.decimals;
  const [laboratory, chainHead] = await Promise.all([getLaboratoryName(db()), readAuditChainHead(db())]);
  const warnings = v.partitions.flatMap((p, i) => (review.estimates[i]?.document.warnings ?? []).map((w) => `${scopeLabel(p)}: ${w}`));
  return (
    <article className="space-y-5 text-ink-900" data-testid="record">
      <header className="space-y-1">
        <div className="flex flex-wrap items-center justify-between gap-2 print:hidden">
          <Link href={`/versions/${v.id}`}>← Back to the version</Link>
          <PrintButton />
        </div>
        <p className="text-sm text-ink-600">{laboratory} · Bellwether sign-off record</p>
        <h1>
          {analyte.code} ({analyte.name}), version {v.number}
        </h1>
        <p className="text-sm text-ink-700">
          State: <strong>{versionStateWords(review)}</strong> · printed {formatDateTime(new Date())} by {caller.name}
        </p>
      </header>

      <RecordSection title="1. The interval" first>
        <SimpleTable
          caption="Partitions with limits, 90% CIs, method and n"
          head={["Partition", `Limits (${v.unit})`, "Lower 90% CI", "Upper 90% CI", "Method", "n"]}
          rows={v.partitions.map((p) => [lmsScopeLabel(p) ?? scopeLabel(p), limitsText(p, d), ciText(p.lowCi, d), ciText(p.highCi, d), METHOD_WORDS[p.method] ?? p.method, String(p.n)])}
        />
        <LmsPartitionsCurves partitions={v.partitions} unit={v.unit} decimals={d} />
        <Facts
          rows={[
            ["Critical limits", `${fixed(v.criticalLow, d)} low, ${fixed(v.criticalHigh, d)} high`],
            ["Drafted", `${formatDateTime(v.createdAt)}${v.createdBy ? ` by ${v.createdBy.name}` : ""}`],
            ["Submitted", v.submittedAt ? `${formatDateTime(v.submittedAt)}${people.submittedBy ? ` by ${people.submittedBy.name}` : ""}` : "not yet"],
            ["In force", v.effectiveFrom ? `from ${formatDateTime(v.effectiveFrom)}${v.effectiveTo ? ` to ${formatDateTime(v.effectiveTo)}` : ""}` : "not in force"],
            ["Review by", people.reviewBy ? formatDate(people.reviewBy) : "—"],
            ["Note", v.note ?? "—"],
          ]}
        />
      </RecordSection>

      <RecordSection title="2. Evidence">
        <Facts
          rows={[
            ["Study", study ? study.title : "None: not drafted from a study"],
            ["Method", study?.method ?? "not recorded"],
            ["Specimen", study?.specimen ?? "not recorded"],
            ["Reference individuals", <span key="c" className="whitespace-pre-line">{study?.criteria ?? "not recorded"}</span>],
            ["Collected", study && (study.collectedFrom || study.collectedTo) ? `${study.collectedFrom ?? "…"} to ${study.collectedTo ?? "…"}` : "not recorded"],
            ["Exclusions in effect", review.exclusions === null ? "listed for directors and scientists only" : String(review.exclusions.length)],
            [
              "Compared with",
              comparison.inForce
                ? `version ${comparison.inForce.number}: ${comparison.donorFlagChanges.changed} of ${comparison.donorFlagChanges.total} donors would change flag`
                : "no earlier version in force",
            ],
            [`Patient scores, last ${comparison.recentScores.days} days`, <span key="r" data-testid="record-recent-scores">{recentScoresSentences(comparison.recentScores).join(" ")}</span>],
          ]}
        />
        {review.uploads.length > 0 ? (
          <SimpleTable
            caption="The study's uploads with their SHA-256"
            head={["Upload", "SHA-256", "Rows"]}
            rows={review.uploads.map((u) => [u.fileName, <span key="h" className="break-all font-mono text-xs">{u.sha256}</span>, String(u.rowsTotal)])}
          />
        ) : null}
        <SimpleTable
          caption="Limits beside the version compared with"
          head={["Partition", comparison.inForce ? `Version ${comparison.inForce.number}` : "Before", `This version`]}
          rows={comparison.partitions.map((p) => [p.partition.label, limitsText(p.old, d), limitsText(p.new, d)])}
        />
        {review.exclusions && review.exclusions.length > 0 ? (
          <SimpleTable
            caption="Exclusions in effect with their reasons"
            head={["Donor", `Value (${v.unit})`, "Reason", "By"]}
            rows={review.exclusions.map((x) => [x.donorCode, fixed(x.value, d), x.reason, x.createdBy?.name ?? "—"])}
          />
        ) : null}
        <div>
          <h3 className="text-sm font-semibold">Warnings</h3>
          {warnings.length === 0 ? (
            <p className="text-sm">The estimates gave no warning.</p>
          ) : (
            <ul className="list-disc pl-5 text-sm">
              {warnings.map((w, i) => (
                <li key={i}>{w}</li>
              ))}
            </ul>
          )}
        </div>
      </RecordSection>

      <RecordSection title="3. Signatures">
        <div className="break-inside-avoid space-y-2" data-testid="signature-block">
          <SignatureList signatures={review.signatures} full />
          <p className="text-xs text-ink-600">
            Each content SHA-256 is the hash of the RFC 8785 (JCS) serialisation of the version&apos;s signed content: analyte code
            and unit, version number, each partition&apos;s limits, CIs, method and scoring model, the critical limits and the
            study&apos;s upload hashes. Anyone can recompute it to check that the version is the one signed.
          </p>
        </div>
        <div className="break-inside-avoid space-y-2" data-testid="audit-chain-head">
          <h3 className="text-sm font-semibold">Audit trail at printing</h3>
          {chainHead ? (
            <>
              <Facts
                rows={[
                  ["Audit chain head", `link ${chainHead.position}, audit event ${chainHead.eventId}`],
                  ["SHA-256", <span key="h" className="break-all font-mono text-xs">{chainHead.hash}</span>],
                ]}
              />
              <p className="text-xs text-ink-600">
                Every audit event carries the hash of the one before it. Kept with this record, the head above lets the
                laboratory check later that the audit trail was not rewritten since:{" "}
                <code className="break-all">
                  npm run -s bellwether -- verify-audit --head {chainHead.position}:{chainHead.hash}
                </code>
              </p>
            </>
          ) : (
            <p className="text-sm">The audit chain was empty.</p>
          )}
        </div>
      </RecordSection>
    </article>
  );
}
