import { Badge } from "@/components/ui/badge";
import { STUDY_KIND_WORDS, STUDY_STATUS_WORDS, type StudyAnalyte, type StudyView } from "./types";

const AGE_CURVE_STEPS = [
  { id: "donor-results", label: "Donor results" },
  { id: "age-curves", label: "Age curves" },
  { id: "draft", label: "Draft" },
];

const INDIRECT_STEPS = [
  { id: "donor-results", label: "Routine results" },
  { id: "indirect", label: "Clean and estimate" },
  { id: "draft", label: "Draft" },
];

const STEPS = [
  { id: "donor-results", label: "Donor results" },
  { id: "screening", label: "Screening" },
  { id: "partitions", label: "Partitions" },
  { id: "estimates", label: "Estimates" },
  { id: "draft", label: "Draft" },
];

function Count({ label, value, testId }: { label: string; value: number; testId: string }) {
  return (
    <div className="rounded-md border border-ink-200 bg-white px-3 py-2">
      <dt className="text-xs font-medium uppercase tracking-wide text-ink-500">{label}</dt>
      <dd className="text-lg font-semibold text-ink-900" data-testid={testId}>
        {value.toLocaleString("en")}
      </dd>
    </div>
  );
}

/** The study's header: analyte, unit, status, what was recorded about it, counts, and the steps as anchors. */
export function StudyHeader({ study, analyte, actions }: { study: StudyView; analyte: StudyAnalyte; actions?: React.ReactNode }) {
  const period =
    study.collectedFrom || study.collectedTo ? `${study.collectedFrom ?? "…"} to ${study.collectedTo ?? "…"}` : "not recorded";
  return (
    <header className="mb-5 space-y-4">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <div className="min-w-0">
          <p className="text-sm text-ink-600">
            <span className="font-mono font-semibold text-ink-900">{analyte.code}</span> · {analyte.name} · in{" "}
            <span className="font-mono">{analyte.unit}</span>
          </p>
          <h1 className="mt-0.5 break-words">{study.title}</h1>
          <p className="mt-1">
            <Badge tone={study.status === "open" ? "ok" : "neutral"}>{STUDY_STATUS_WORDS[study.status]}</Badge>{" "}
            <span data-testid="study-kind"><Badge tone="brand">{STUDY_KIND_WORDS[study.kind]}</Badge></span>
            <span className="ml-2 text-sm text-ink-600">opened on {study.openedOn}</span>
          </p>
        </div>
        {actions}
      </div>
      {study.status === "closed" ? (
        <p role="status" className="rounded-md border border-ink-300 bg-ink-100 px-3 py-2 text-sm text-ink-800" data-testid="study-closed">
          This study was closed on {study.closedOn ?? "an unrecorded day"}
          {study.closedBy ? ` by ${study.closedBy}` : ""}. No more data can be changed: no uploads, exclusions, estimates or drafts.
          Its results and decisions stay readable here.
        </p>
      ) : null}
      <dl className="grid grid-cols-2 gap-2 sm:grid-cols-4">
        <Count label="Donor results" value={study.counts.donorResults} testId="count-donor-results" />
        <Count label="Uploads committed" value={study.counts.uploads} testId="count-uploads" />
        <Count label="Exclusions" value={study.counts.exclusions} testId="count-exclusions" />
        <Count label="Awaiting commit" value={study.counts.pendingUploads} testId="count-pending" />
      </dl>
      <dl className="grid gap-x-6 gap-y-1 text-sm md:grid-cols-[auto_1fr]">
        <dt className="text-ink-500">Method</dt>
        <dd>{study.method ?? "not recorded"}</dd>
        <dt className="text-ink-500">Specimen</dt>
        <dd>{study.specimen ?? analyte.specimen}</dd>
        <dt className="text-ink-500">Reference individuals</dt>
        <dd className="whitespace-pre-line">{study.criteria ?? "not recorded"}</dd>
        <dt className="text-ink-500">Collected</dt>
        <dd>{period}</dd>
      </dl>
      <nav aria-label="Steps of the study" className="overflow-x-auto">
        <ol className="flex gap-1 text-sm">
          {(study.kind === "age_curve" ? AGE_CURVE_STEPS : study.kind === "indirect" ? INDIRECT_STEPS : STEPS).map((s, i) => (
            <li key={s.id}>
              <a href={`#${s.id}`} className="block whitespace-nowrap rounded-md border border-ink-200 bg-white px-3 py-1.5 text-ink-700 hover:border-tide-500 hover:text-tide-700">
                {i + 1}. {s.label}
              </a>
            </li>
          ))}
        </ol>
      </nav>
    </header>
  );
}
