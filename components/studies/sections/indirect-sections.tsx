import { IndirectDraftPanel } from "@/components/studies/indirect/indirect-draft-panel";
import { IndirectPanel } from "@/components/studies/indirect/indirect-panel";
import type { RoutineVocabulary } from "@/components/studies/indirect/types";
import type { StudySectionProps } from "@/components/studies/types";

/**
 * The steps of an indirect study after its routine results: cleaning and the estimate (step 2)
 * and the draft (step 3). Screening and the partition tests of direct studies do not apply: the
 * cleaning steps take their place, and the partition is the last of them.
 */
export function IndirectSections({ study, analyte, vocabulary }: StudySectionProps & { vocabulary: RoutineVocabulary }) {
  const section = { id: study.id, status: study.status, title: study.title, donorResultCount: study.counts.donorResults };
  return (
    <>
      <IndirectPanel study={section} analyte={analyte} vocabulary={vocabulary} />
      <IndirectDraftPanel study={section} analyte={analyte} />
    </>
  );
}
