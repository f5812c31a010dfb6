import type { Metadata } from "next";
import Link from "next/link";
import { NewStudyForm } from "@/components/studies/new-study-form";
import { StudiesTable } from "@/components/studies/studies-table";
import type { StudyRow } from "@/components/studies/types";
import { PageHeader, Panel } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listAnalytes } from "@/db/queries/analytes";
import { listStudies } from "@/db/queries/studies";
import { requirePageCaller } from "@/lib/auth/session";
import { formatDate } from "@/lib/format";
import { createStudyAction } from "./actions";

export const metadata: Metadata = { title: "Studies" };

/** The laboratory's reference studies, and the form that opens a new one (directors and scientists). */
export default async function StudiesPage() {
  await requirePageCaller("studies:write");
  const [studies, analytes] = await Promise.all([listStudies(db()), listAnalytes(db())]);
  const names = new Map(analytes.map((a) => [a.code, a.name]));
  const rows: StudyRow[] = studies.map((s) => ({
    id: s.id,
    analyte: s.analyteCode,
    analyteName: names.get(s.analyteCode) ?? "",
    title: s.title,
    kind: s.kind,
    status: s.status,
    donorResults: s.donorResultCount,
    uploads: s.committedUploadCount,
    openedOn: formatDate(s.createdAt),
  }));
  const choices = analytes.map((a) => ({ code: a.code, name: a.name, unit: a.unit, decimals: a.decimals, specimen: a.specimen }));
  return (
    <>
      <PageHeader
        title="Studies"
        lead="A study gathers healthy-donor results for one analyte, method and specimen. Open one, upload its results, screen them, assess partitions and estimate the limits, then draft an interval version."
      />
      <div className="grid items-start gap-5 2xl:grid-cols-[1fr_24rem]">
        <Panel title={rows.length === 1 ? "1 study" : `${rows.length} studies`}>
          {rows.length === 0 ? (
            <div className="space-y-2 py-4 text-sm text-ink-600" data-testid="studies-empty">
              <p className="font-medium text-ink-900">No study has been opened yet.</p>
              <p>
                Open the first one with the form: choose the analyte, give the study a title and write down who the reference
                individuals are. You will then upload their results from a CSV or Excel file.
              </p>
              {choices.length === 0 ? (
                <p>
                  The analyte catalogue is empty: <Link href="/analytes">add the analyte</Link> first.
                </p>
              ) : null}
            </div>
          ) : (
            <StudiesTable rows={rows} />
          )}
        </Panel>
        <Panel title="New study">
          <NewStudyForm action={createStudyAction} analytes={choices} />
        </Panel>
      </div>
    </>
  );
}
