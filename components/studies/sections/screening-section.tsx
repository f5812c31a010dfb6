import { ScreeningPanel } from "@/components/studies/analysis/screening-panel";
import type { SectionProps } from "@/components/studies/analysis/types";

/** The study page's Screening section: outlier screens, decisions and exclusions. */
export function ScreeningSection(props: SectionProps) {
  return <ScreeningPanel {...props} />;
}

export default ScreeningSection;
