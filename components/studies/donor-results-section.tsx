"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { useSWRConfig } from "swr";
import { Button } from "@/components/ui/button";
import { readProblem } from "./api";
import { DonorResultsTable } from "./donor-results-table";
import { StudySection } from "./study-section";
import type { StudySectionProps } from "./types";
import { UploadPanel } from "./upload-panel";
import type { UploadSummary } from "./upload-types";

const UPLOAD_STATUS_WORDS: Record<UploadSummary["status"], string> = {
  pending: "Awaiting commit",
  committed: "Committed",
  cancelled: "Cancelled",
};

function plural(n: number, one: string, many: string): string {
  return `${n.toLocaleString("en")} ${n === 1 ? one : many}`;
}

/** The uploads of the study, newest first; one still pending can be committed or cancelled here. */
function UploadsList({ studyId, uploads, open, onDecided }: { studyId: string; uploads: UploadSummary[]; open: boolean; onDecided: () => void }) {
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  async function decide(id: string, decision: "commit" | "cancel") {
    setBusy(id);
    setError(null);
    const res = await fetch(`/api/v1/studies/${studyId}/uploads/${id}/${decision}`, { method: "POST" }).catch(() => null);
    setBusy(null);
    if (res?.ok) onDecided();
    else setError(res ? await readProblem(res) : "The server could not be reached; try again.");
  }
  if (uploads.length === 0) return null;
  return (
    <details className="rounded-md border border-ink-200" open={uploads.some((u) => u.status === "pending")}>
      <summary className="cursor-pointer px-3 py-2 text-sm font-medium text-ink-800">{plural(uploads.length, "upload", "uploads")} of this study</summary>
      {error ? (
        <p role="alert" className="mx-3 mb-2 rounded-md bg-red-50 px-3 py-2 text-sm text-signal-high">
          {error}
        </p>
      ) : null}
      <div className="overflow-x-auto border-t border-ink-100">
        <table className="min-w-full divide-y divide-ink-100 text-sm" data-testid="uploads-list">
          <caption className="sr-only">Uploads of this study</caption>
          <thead className="bg-ink-50">
            <tr>
              {["File", "Status", "Rows valid / read", "Stored", "Uploaded", ""].map((h, i) => (
                <th key={i} scope="col" className="whitespace-nowrap px-3 py-1.5 text-left text-xs font-semibold uppercase tracking-wide text-ink-600">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100">
            {uploads.map((u) => (
              <tr key={u.id}>
                <td className="px-3 py-1.5 break-all">{u.fileName}</td>
                <td className="whitespace-nowrap px-3 py-1.5">{UPLOAD_STATUS_WORDS[u.status]}</td>
                <td className="whitespace-nowrap px-3 py-1.5 tabular-nums">
                  {u.rows.valid.toLocaleString("en")} / {u.rows.total.toLocaleString("en")}
                </td>
                <td className="whitespace-nowrap px-3 py-1.5 tabular-nums">{u.stored === null ? "—" : u.stored.toLocaleString("en")}</td>
                <td className="whitespace-nowrap px-3 py-1.5">{u.uploadedAt}</td>
                <td className="whitespace-nowrap px-3 py-1.5">
                  {open && u.status === "pending" ? (
                    <span className="flex gap-2">
                      <Button type="button" className="px-2 py-1 text-xs" disabled={busy !== null} onClick={() => decide(u.id, "commit")}>
                        Commit
                      </Button>
                      <Button type="button" variant="secondary" className="px-2 py-1 text-xs" disabled={busy !== null} onClick={() => decide(u.id, "cancel")}>
                        Cancel
                      </Button>
                    </span>
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </details>
  );
}

/**
 * Step 1 of a study: upload healthy-donor results (while the study is open) and page through
 * what is stored.
 */
export function DonorResultsSection({ study, analyte, uploads }: StudySectionProps & { uploads: UploadSummary[] }) {
  const router = useRouter();
  const { mutate } = useSWRConfig();
  const open = study.status === "open";
  const n = study.counts.donorResults;
  const refresh = () => {
    router.refresh();
    void mutate((key) => typeof key === "string" && key.startsWith(`/api/v1/studies/${study.id}/donor-results`));
  };
  const routine = study.kind === "indirect";
  const done =
    n === 0
      ? `No ${routine ? "routine" : "donor"} results stored yet.`
      : `${routine ? plural(n, "routine result", "routine results") : plural(n, "donor result", "donor results")} stored from ${plural(study.counts.uploads, "committed upload", "committed uploads")}${
          study.counts.exclusions > 0 ? `; ${plural(study.counts.exclusions, "exclusion", "exclusions")} in effect` : ""
        }.`;
  const next = !open
    ? "The study is closed: no more files can be uploaded."
    : study.counts.pendingUploads > 0
      ? "An upload awaits your decision: commit its valid rows or cancel it (in the list of uploads below)."
      : routine
        ? n === 0
          ? "Upload the routine results exported from the laboratory system: a pseudonymous patient_key, sex, age, collected_at (date and time), value, and the setting and flags where the system records them."
          : "Choose the cleaning steps and estimate (step 2), or upload more results from another file."
      : study.kind === "age_curve"
        ? n === 0
          ? "Upload the healthy-donor results with each donor's birth_date and collected_on: an age-curve study needs exact ages (age_years alone and censored values are refused)."
          : "Fit the age curves (step 2), or upload more results from another file."
        : n === 0
          ? "Upload the healthy-donor results: a CSV or Excel file in the template's columns, or any columns you then map. Start with an example file if you are trying Bellwether out."
          : "Screen the results for outliers (step 2), or upload more results from another file.";
  return (
    <StudySection id="donor-results" step={1} title={routine ? "Routine results" : "Donor results"} done={done} next={next}>
      {open ? <UploadPanel
          studyId={study.id}
          analyte={analyte}
          onDecided={refresh}
          nextAfterCommit={study.kind === "age_curve" ? "Fit the age curves next." : routine ? "Choose the cleaning steps and estimate next." : undefined}
          routine={routine}
        /> : null}
      <UploadsList studyId={study.id} uploads={uploads} open={open} onDecided={refresh} />
      <DonorResultsTable studyId={study.id} analyte={analyte} routine={routine} />
    </StudySection>
  );
}
