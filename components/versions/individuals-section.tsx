import Link from "next/link";
import { StudySection } from "@/components/studies/study-section";
import { SimpleTable } from "@/components/ui/simple-table";
import type { VersionReviewView as VersionReview } from "./types";
import { formatDate } from "@/lib/format";
import { fixed } from "./numbers";

/** How many exclusions the page lists before pointing to the study and the dossier. */
const SHOWN = 200;

/** The study's reference individuals and the exclusions in effect, each with its reason. */
export function IndividualsSection({ review, step }: { review: VersionReview; step: number }) {
  const { study, exclusions, analyte } = review;
  if (!study) {
    return (
      <StudySection id="individuals" step={step} title="Reference individuals" done="This version was not drafted from a study of this laboratory." />
    );
  }
  const period = study.collectedFrom || study.collectedTo ? `${study.collectedFrom ?? "…"} to ${study.collectedTo ?? "…"}` : "not recorded";
  return (
    <StudySection
      id="individuals"
      step={step}
      title="Reference individuals and exclusions"
      done={
        <>
          Study <Link href={`/studies/${study.id}`}>{study.title}</Link> ({study.status}).
        </>
      }
    >
      <dl className="grid gap-x-6 gap-y-1 text-sm md:grid-cols-[auto_1fr]">
        <dt className="text-ink-500">Method</dt>
        <dd>{study.method ?? "not recorded"}</dd>
        <dt className="text-ink-500">Specimen</dt>
        <dd>{study.specimen ?? "not recorded"}</dd>
        <dt className="text-ink-500">Reference individuals</dt>
        <dd className="whitespace-pre-line">{study.criteria ?? "not recorded"}</dd>
        <dt className="text-ink-500">Collected</dt>
        <dd>{period}</dd>
      </dl>
      {exclusions === null ? (
        <p className="text-sm text-ink-600">Exclusions are donor-level data, shown to directors and scientists only.</p>
      ) : (
        <>
          <h3 className="text-sm font-semibold text-ink-800">Exclusions in effect: {exclusions.length}</h3>
          <SimpleTable
            caption="Exclusions in effect, each with its reason"
            testId="exclusions-table"
            empty="No donor result is excluded."
            head={["Donor", "Sex", "Age", `Value (${analyte.unit})`, "Source", "Reason", "By", "On"]}
            rows={exclusions.slice(0, SHOWN).map((x) => [
              <span key="c" className="font-mono">{x.donorCode}</span>,
              x.sex,
              String(x.ageYears),
              fixed(x.value, analyte.decimals),
              x.source === "outlier" ? `Outlier${x.rule ? ` (${x.rule})` : ""}` : "By hand",
              x.reason,
              x.createdBy?.name ?? "—",
              formatDate(x.createdAt),
            ])}
          />
          {exclusions.length > SHOWN ? (
            <p className="text-sm text-ink-600">
              The first {SHOWN} are shown; the study page and the dossier list all {exclusions.length}.
            </p>
          ) : null}
        </>
      )}
    </StudySection>
  );
}
