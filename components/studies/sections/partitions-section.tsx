import { PartitionsPanel } from "@/components/studies/analysis/partitions-panel";
import type { SectionProps } from "@/components/studies/analysis/types";

/** The study page's Partitions section: Harris-Boyd and Lahti assessments and the partition plan. */
export function PartitionsSection(props: SectionProps) {
  return <PartitionsPanel {...props} />;
}

export default PartitionsSection;
