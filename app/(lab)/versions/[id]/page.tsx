import type { Metadata } from "next";
import { StudySection } from "@/components/studies/study-section";
import { ComparisonSection } from "@/components/versions/comparison-section";
import { EstimatesSection, WarningsSection } from "@/components/versions/estimates-section";
import { IndividualsSection } from "@/components/versions/individuals-section";
import { PartitionsSection } from "@/components/versions/partitions-section";
import { SignatureList } from "@/components/versions/signature-list";
import { VersionActions } from "@/components/versions/version-actions";
import { VersionHeader, VersionRecordLinks } from "@/components/versions/version-header";
import { db } from "@/db/client";
import { versionAuthorship } from "@/db/queries/version-moves";
import { hasSignedInSession } from "@/db/queries/version-record";
import { can } from "@/lib/auth/roles";
import { currentSession, requirePageCaller } from "@/lib/auth/session";
import { loadVersionReview } from "./load";

export const metadata: Metadata = { title: "Version review" };

/**
 * One interval version's evidence on one page, top to bottom (UX.md, "Version review"): what
 * changes, the reference individuals and exclusions, partitions and verdicts, the estimates, the
 * warnings; then the moves open to the caller, the signature panel last.
 */
export default async function VersionPage({ params }: { params: Promise<{ id: string }> }) {
  const caller = await requirePageCaller("studies:write");
  const { id } = await params;
  const review = await loadVersionReview(id, { donorLevel: can(caller.role, "donors:read") });
  const { version } = review;
  const label = `version ${version.number} of ${version.analyte.code}`;
  const director = can(caller.role, "versions:sign");
  // The server's own reading of the duty rule (columns and the version's history), so that the
  // page offers no move the server would refuse.
  const authored = director ? await versionAuthorship(db(), { versionId: version.id, userId: caller.id }) : [];
  const dutyRule = authored.length > 0 ? `You ${authored.join(" and ")} this version: another director must sign it off or return it.` : null;
  const session = await currentSession();
  const emailNeeded = director && session ? !(await hasSignedInSession(db(), { signerId: caller.id, sessionId: session.sessionId })) : true;
  return (
    <>
      <VersionHeader review={review} actions={<VersionRecordLinks versionId={version.id} />} />
      <div className="space-y-5">
        <section aria-labelledby="signatures-heading" className="rounded-lg border border-ink-200 bg-white p-4">
          <h2 id="signatures-heading" className="mb-2">
            Signatures
          </h2>
          <SignatureList signatures={review.signatures} />
        </section>
        <ComparisonSection
          comparison={review.comparison}
          decimals={version.decimals}
          step={1}
          routine={version.partitions.some((p) => p.method === "indirect")}
        />
        <IndividualsSection review={review} step={2} />
        <PartitionsSection review={review} step={3} />
        <EstimatesSection review={review} step={4} />
        <WarningsSection review={review} step={5} />
        {version.state === "superseded" || version.state === "withdrawn" ? (
          <StudySection id="no-moves" step={6} title="Actions" done={`This version is ${version.state}: it takes no more moves.`} />
        ) : null}
        <VersionActions
          versionId={version.id}
          label={label}
          state={version.state}
          canSubmit={can(caller.role, "studies:write")}
          canDecide={director && authored.length === 0}
          dutyRule={dutyRule}
          canKeepOrWithdraw={director && authored.length === 0}
          emailNeeded={emailNeeded}
        />
      </div>
    </>
  );
}
