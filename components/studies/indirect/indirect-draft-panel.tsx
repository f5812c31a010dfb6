"use client";

import { formatValue } from "@/lib/format";
import { ChosenEstimatesDraft } from "../analysis/chosen-estimates-draft";
import type { SectionAnalyte, SectionStudy } from "../analysis/types";
import { useIndirectEstimates } from "./indirect-panel";
import { indirectPartitionWords } from "./types";

/**
 * Step 3 of an indirect study: a draft interval version whose partitions take the chosen indirect
 * estimates' limits (method indirect; scored by the fitted non-diseased distribution, with the
 * caution that the interval was estimated indirectly). The partitions must not overlap.
 */
export function IndirectDraftPanel({ study, analyte }: { study: SectionStudy; analyte: SectionAnalyte }) {
  const { items } = useIndirectEstimates(study.id);
  // By default the newest estimate of each partition that placed both limits.
  const seen = new Set<string>();
  const defaults = items
    .filter((e) => {
      const key = JSON.stringify(e.partition);
      if (seen.has(key) || e.indirect.lower === null || e.indirect.upper === null) return false;
      seen.add(key);
      return true;
    })
    .map((e) => e.id);
  const d = analyte.decimals;
  return (
    <ChosenEstimatesDraft
      study={study}
      analyte={analyte}
      method="indirect"
      testPrefix="indirect"
      defaults={defaults}
      items={items.map((e) => ({
        id: e.id,
        label: `${indirectPartitionWords(e.partition)} · ${formatValue(e.indirect.lower, d)}–${formatValue(e.indirect.upper, d)} ${analyte.unit} · n = ${e.n.toLocaleString("en")} · made ${e.createdAt.slice(0, 16).replace("T", " ")}`,
      }))}
      words={{
        first: "Estimate first (step 2).",
        choose: "Choose the estimates the version holds and create the draft.",
        form: "Draft a version from the indirect estimates",
        legend: "Estimates the version holds",
        hint: "One estimate per partition, the partitions not overlapping. The version names the indirect method; every score from it carries the caution that the interval was estimated from routine results.",
        empty: (
          <>
            Estimate under <a href="#indirect" className="underline">Clean and estimate</a>; the draft takes its partitions from the estimates.
          </>
        ),
        created: (v) =>
          `${v.partitions.length} partition${v.partitions.length === 1 ? "" : "s"} estimated indirectly (${v.partitions
            .map((p) => indirectPartitionWords(p).toLowerCase())
            .join("; ")}).`,
        listed: (v) => v.partitions.map((p) => `${indirectPartitionWords(p)} (${p.method}, n = ${p.n})`).join("; "),
      }}
    />
  );
}
