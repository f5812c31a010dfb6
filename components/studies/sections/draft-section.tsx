import { StudySection } from "../study-section";
import type { StudySectionProps } from "../types";

/** The study's Draft version step. The analysis work replaces this body; the frame passes only `{ study, analyte }`. */
export function DraftSection({ study }: StudySectionProps) {
  const closed = study.status === "closed";
  return (
    <StudySection
      id="draft"
      step={5}
      title="Draft version"
      next={
        closed
          ? "The study is closed: nothing more can be changed here."
          : study.counts.donorResults === 0
            ? "Waits for donor results: upload and commit them in step 1 first."
            : "Pick a method for each partition and draft an interval version of the analyte for the director to sign off."
      }
    />
  );
}
