import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { z } from "zod";
import { CloseStudyButton } from "@/components/studies/close-study-button";
import { DonorResultsSection } from "@/components/studies/donor-results-section";
import { AgeCurveSections } from "@/components/studies/sections/age-curve-sections";
import { DraftSection } from "@/components/studies/sections/draft-section";
import { EstimatesSection } from "@/components/studies/sections/estimates-section";
import { IndirectSections } from "@/components/studies/sections/indirect-sections";
import { PartitionsSection } from "@/components/studies/sections/partitions-section";
import { ScreeningSection } from "@/components/studies/sections/screening-section";
import { StudyHeader } from "@/components/studies/study-header";
import type { StudyAnalyte, StudyView } from "@/components/studies/types";
import type { UploadSummary } from "@/components/studies/upload-types";
import { db } from "@/db/client";
import { routineVocabulary } from "@/db/queries/indirect-estimates";
import { countActiveExclusions, studyCloser, studyDetail } from "@/db/queries/studies";
import { AppError } from "@/lib/api/errors";
import { requirePageCaller } from "@/lib/auth/session";
import { formatDate, formatDateTime } from "@/lib/format";

export const metadata: Metadata = { title: "Study" };

async function loadStudy(id: string) {
  if (!z.uuid().safeParse(id).success) notFound();
  try {
    return await studyDetail(db(), { id });
  } catch (err) {
    if (err instanceof AppError && err.code === "not_found") notFound();
    throw err;
  }
}

/**
 * One study, in the order of the work: donor results, screening, partitions, estimates, draft;
 * for an age-curve study donor results, the LMS curves and the draft; for an indirect study
 * routine results, cleaning with the estimate, and the draft.
 * Every section stays on the page (no tabs), each with its anchor.
 */
export default async function StudyPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePageCaller("studies:write");
  const { id } = await params;
  const detail = await loadStudy(id);
  const [exclusions, closer, vocabulary] = await Promise.all([
    countActiveExclusions(db(), { studyId: id }),
    studyCloser(db(), { study: detail }),
    detail.kind === "indirect" ? routineVocabulary(db(), { studyId: id }) : null,
  ]);
  const analyte: StudyAnalyte = {
    code: detail.analyte.code,
    name: detail.analyte.name,
    unit: detail.analyte.unit,
    decimals: detail.analyte.decimals,
    specimen: detail.analyte.specimen,
  };
  const study: StudyView = {
    id: detail.id,
    title: detail.title,
    status: detail.status,
    kind: detail.kind,
    method: detail.method,
    specimen: detail.specimen,
    criteria: detail.criteria,
    collectedFrom: detail.collectedFrom,
    collectedTo: detail.collectedTo,
    openedOn: formatDate(detail.createdAt),
    closedOn: detail.closedAt ? formatDate(detail.closedAt) : null,
    closedBy: closer?.name ?? null,
    partitionPlan: detail.partitionPlan ?? null,
    counts: {
      donorResults: detail.donorResultCount,
      uploads: detail.uploads.filter((u) => u.status === "committed").length,
      pendingUploads: detail.uploads.filter((u) => u.status === "pending").length,
      exclusions,
    },
  };
  const uploads: UploadSummary[] = detail.uploads.map((u) => ({
    id: u.id,
    fileName: u.fileName,
    status: u.status,
    rows: u.rows,
    stored: u.storedRows,
    uploadedAt: formatDateTime(u.uploadedAt),
  }));
  return (
    <>
      <StudyHeader
        study={study}
        analyte={analyte}
        actions={study.status === "open" ? <CloseStudyButton studyId={study.id} pendingUploads={study.counts.pendingUploads} /> : undefined}
      />
      <div className="space-y-5">
        <DonorResultsSection study={study} analyte={analyte} uploads={uploads} />
        {study.kind === "age_curve" ? (
          <AgeCurveSections study={study} analyte={analyte} />
        ) : study.kind === "indirect" && vocabulary ? (
          <IndirectSections study={study} analyte={analyte} vocabulary={vocabulary} />
        ) : (
          <>
            <ScreeningSection study={study} analyte={analyte} />
            <PartitionsSection study={study} analyte={analyte} />
            <EstimatesSection study={study} analyte={analyte} />
            <DraftSection study={study} analyte={analyte} />
          </>
        )}
      </div>
    </>
  );
}
