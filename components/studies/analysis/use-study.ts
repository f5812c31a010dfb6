"use client";

import useSWR from "swr";
import { fetchJson, studyApi } from "./api";
import type { PartitionPlan, SectionStudy } from "./types";

/**
 * The study as it stands (GET /api/v1/studies/{id}), starting from what the page passed: the
 * partition plan chosen in one section is read by the next through this one SWR key.
 */
export function useStudy(study: SectionStudy) {
  const key = studyApi(study.id);
  const swr = useSWR<SectionStudy>(key, fetchJson, { fallbackData: study, revalidateOnMount: false });
  const current = swr.data ?? study;
  return { study: current, plan: (current.partitionPlan ?? null) as PartitionPlan | null, refresh: () => swr.mutate() };
}
