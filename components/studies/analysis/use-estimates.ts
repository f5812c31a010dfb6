"use client";

import useSWR from "swr";
import { fetchJson, studyApi } from "./api";
import { partitionKey, partitionsOfPlan } from "./partitions";
import type { EstimateListItem, EstimateMethod, LimitsLike, Partition, SectionStudy } from "./types";
import { useStudy } from "./use-study";

/**
 * The partitions of the study's plan (everyone without one) and, for each, its newest estimate.
 * Shared by the Estimates and Draft sections through one SWR key.
 */
export function useEstimates(initial: SectionStudy) {
  const { study, plan } = useStudy(initial);
  const key = `${studyApi(study.id)}/estimates`;
  const swr = useSWR<{ items: EstimateListItem[] }>(key, fetchJson);
  const partitions: Partition[] = partitionsOfPlan(plan);
  const latest = new Map<string, EstimateListItem>();
  for (const e of swr.data?.items ?? []) {
    const k = partitionKey(e.partition);
    // Newest first: the first one seen for a partition is its latest.
    if (!latest.has(k)) latest.set(k, e);
  }
  return { study, plan, partitions, latest, estimates: swr, key };
}

export const METHOD_WORDS: Record<EstimateMethod, string> = {
  nonparametric: "Nonparametric",
  parametric: "Parametric",
  robust: "Robust",
};

/** The limits of one method of an estimate. */
export function limitsOf(e: { nonparametric: LimitsLike; parametric: LimitsLike; robust: LimitsLike }, method: EstimateMethod): LimitsLike {
  return e[method];
}

export function hasLimits(l: LimitsLike | null | undefined): boolean {
  return !!l && l.lower !== null && l.upper !== null;
}
