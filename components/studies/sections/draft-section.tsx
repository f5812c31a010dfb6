import { DraftPanel } from "@/components/studies/analysis/draft-panel";
import type { SectionProps } from "@/components/studies/analysis/types";

/** The study page's Draft section: a draft interval version from the estimates, and its revisions. */
export function DraftSection(props: SectionProps) {
  return <DraftPanel {...props} />;
}

export default DraftSection;
