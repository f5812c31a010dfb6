import { StudySection } from "../study-section";
import type { StudySectionProps } from "../types";

/** The study's Screening step. The analysis work replaces this body; the frame passes only `{ study, analyte }`. */
export function ScreeningSection({ study }: StudySectionProps) {
  const closed = study.status === "closed";
  return (
    <StudySection
      id="screening"
      step={2}
      title="Screening"
      next={
        closed
          ? "The study is closed: nothing more can be changed here."
          : study.counts.donorResults === 0
            ? "Waits for donor results: upload and commit them in step 1 first."
            : "Screen the donor results for outliers (Horn by default; Dixon or Tukey if you prefer), then confirm or reject each proposal with a reason. A screen proposes; nothing is excluded until you decide."
      }
    />
  );
}
