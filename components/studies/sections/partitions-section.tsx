import { StudySection } from "../study-section";
import type { StudySectionProps } from "../types";

/** The study's Partitions step. The analysis work replaces this body; the frame passes only `{ study, analyte }`. */
export function PartitionsSection({ study }: StudySectionProps) {
  const closed = study.status === "closed";
  return (
    <StudySection
      id="partitions"
      step={3}
      title="Partitions"
      next={
        closed
          ? "The study is closed: nothing more can be changed here."
          : study.counts.donorResults === 0
            ? "Waits for donor results: upload and commit them in step 1 first."
            : "Assess whether the limits should differ by sex or by age band (Harris-Boyd and Lahti side by side), then choose the partitions."
      }
    />
  );
}
