import { EstimatesPanel } from "@/components/studies/analysis/estimates-panel";
import type { SectionProps } from "@/components/studies/analysis/types";

/** The study page's Estimates section: the methods side by side per partition, with charts. */
export function EstimatesSection(props: SectionProps) {
  return <EstimatesPanel {...props} />;
}

export default EstimatesSection;
