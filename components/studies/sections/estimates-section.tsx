import { StudySection } from "../study-section";
import type { StudySectionProps } from "../types";

/** The study's Estimates step. The analysis work replaces this body; the frame passes only `{ study, analyte }`. */
export function EstimatesSection({ study }: StudySectionProps) {
  const closed = study.status === "closed";
  return (
    <StudySection
      id="estimates"
      step={4}
      title="Estimates"
      next={
        closed
          ? "The study is closed: nothing more can be changed here."
          : study.counts.donorResults === 0
            ? "Waits for donor results: upload and commit them in step 1 first."
            : "Estimate the limits for each partition: nonparametric, parametric and robust side by side, with their 90% confidence intervals and warnings."
      }
    />
  );
}
