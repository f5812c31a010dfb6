import { StudySection } from "@/components/studies/study-section";
import { SimpleTable } from "@/components/ui/simple-table";
import type { VersionReviewView as VersionReview } from "./types";
import { formatDate } from "@/lib/format";
import { scopeLabel } from "@/lib/versions/comparison";
import { lmsScopeLabel } from "@/lib/scoring/lms-curves-view";
import { LmsPartitionsCurves } from "./lms-partition";
import { METHOD_WORDS } from "./numbers";

const VERDICT_WORDS: Record<string, string> = { partition: "Partition", combine: "Combine", undecided: "Undecided" };

/** n per partition of the version and the verdicts of the partition assessments run in the study. */
export function PartitionsSection({ review, step }: { review: VersionReview; step: number }) {
  const { version, assessments } = review;
  return (
    <StudySection
      id="partitions"
      step={step}
      title="Partitions"
      done={`${version.partitions.length} partition${version.partitions.length === 1 ? "" : "s"}, ${version.partitions.map((p) => `${lmsScopeLabel(p) ?? scopeLabel(p)}: n = ${p.n}`).join("; ")}.`}
    >
      <SimpleTable
        caption="The version's partitions with n and method"
        testId="partitions-table"
        head={["Partition", "n", "Method"]}
        rows={version.partitions.map((p) => [lmsScopeLabel(p) ?? scopeLabel(p), p.n.toLocaleString("en"), METHOD_WORDS[p.method] ?? p.method])}
      />
      <LmsPartitionsCurves partitions={version.partitions} unit={review.analyte.unit} decimals={review.analyte.decimals} />
      <h3 className="text-sm font-semibold text-ink-800">Partition verdicts (Harris-Boyd and Lahti)</h3>
      {assessments.length === 0 ? (
        <p className="text-sm text-ink-600">No partition assessment was run in the study.</p>
      ) : (
        <SimpleTable
          caption="Partition assessments run in the study, oldest first"
          testId="verdicts-table"
          head={["Made", "Groups", "Verdict", "Summary"]}
          rows={assessments.map((a) => [
            formatDate(a.createdAt),
            a.groups.map((g) => `${g.label} (n = ${g.n})`).join(", "),
            <strong key="v">{VERDICT_WORDS[a.verdict] ?? a.verdict}</strong>,
            a.summary,
          ])}
        />
      )}
    </StudySection>
  );
}
