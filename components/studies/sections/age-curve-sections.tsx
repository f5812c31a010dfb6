import { AgeCurveDraftPanel } from "@/components/studies/age-curves/age-curve-draft-panel";
import { AgeCurvesPanel } from "@/components/studies/age-curves/age-curves-panel";
import type { StudySectionProps } from "@/components/studies/types";

/**
 * The steps of an age-curve study after its donor results: the LMS curves (step 2) and the draft
 * (step 3). Screening, partitions and the estimates of limits do not apply: the curves take age
 * in themselves, and far-out donors show on the chart.
 */
export function AgeCurveSections({ study, analyte }: StudySectionProps) {
  const section = { id: study.id, status: study.status, title: study.title, donorResultCount: study.counts.donorResults };
  return (
    <>
      <AgeCurvesPanel study={section} analyte={analyte} />
      <AgeCurveDraftPanel study={section} analyte={analyte} />
    </>
  );
}
