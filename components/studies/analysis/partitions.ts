import { ageBandsSchema, partitionsOfPlan as planPartitions } from "@/lib/studies/partitions";
import type { Partition, PartitionPlan } from "./types";

/** A partition in words, e.g. "F, age 18 to under 120", "M", "All donors". */
export function partitionLabel(partition: Partition | null | undefined): string {
  const parts: string[] = [];
  if (partition?.sex) parts.push(partition.sex === "F" ? "Female" : "Male");
  const from = partition?.ageFrom;
  const to = partition?.ageTo;
  if (from !== undefined && from !== null && to !== undefined && to !== null) parts.push(`age ${from} to under ${to}`);
  else if (from !== undefined && from !== null) parts.push(`age ${from} and over`);
  else if (to !== undefined && to !== null) parts.push(`age under ${to}`);
  return parts.length > 0 ? parts.join(", ") : "All donors";
}

/** A stable key for a partition (for lists and for matching estimates to partitions). */
export function partitionKey(partition: Partition | null | undefined): string {
  return `${partition?.sex ?? "*"}|${partition?.ageFrom ?? "*"}|${partition?.ageTo ?? "*"}`;
}

/** The partition as query parameters (sex, ageFrom, ageTo). */
export function partitionQuery(partition: Partition | null | undefined): string {
  const q = new URLSearchParams();
  if (partition?.sex) q.set("sex", partition.sex);
  if (partition?.ageFrom !== undefined && partition?.ageFrom !== null) q.set("ageFrom", String(partition.ageFrom));
  if (partition?.ageTo !== undefined && partition?.ageTo !== null) q.set("ageTo", String(partition.ageTo));
  const s = q.toString();
  return s ? `?${s}` : "";
}

/** A partition with only its given fields, for request bodies. */
export function cleanPartition(partition: Partition | null | undefined): Partition {
  const p: Partition = {};
  if (partition?.sex) p.sex = partition.sex;
  if (partition?.ageFrom !== undefined && partition?.ageFrom !== null) p.ageFrom = partition.ageFrom;
  if (partition?.ageTo !== undefined && partition?.ageTo !== null) p.ageTo = partition.ageTo;
  return p;
}

/** The partitions a plan yields (lib/studies/partitions.ts): sex first, then the age bands; everyone without a plan. */
export function partitionsOfPlan(plan: PartitionPlan | null | undefined): Partition[] {
  return planPartitions(plan);
}

/**
 * Age bands typed as "[0, 18) [18, 120)" or "0-18, 18-120" or "0 18 120" (edges): half-open in
 * years. Returns the bands or a message saying what is wrong.
 */
export function parseAgeBands(text: string): { bands: [number, number][] } | { error: string } {
  const trimmed = text.trim();
  if (!trimmed) return { error: "Type at least two age bands, for example [0, 18) [18, 120)." };
  const pairs = [...trimmed.matchAll(/(\d+(?:\.\d+)?)\s*(?:,|-|–|to)\s*(\d+(?:\.\d+)?)/g)];
  let bands: [number, number][];
  if (/[[(]/.test(trimmed) || pairs.length >= 2) {
    bands = pairs.map((m) => [Number(m[1]), Number(m[2])]);
  } else {
    const edges = trimmed.split(/[\s,;]+/).filter(Boolean).map(Number);
    if (edges.some((e) => !Number.isFinite(e))) return { error: `"${text}" is not a list of age bands; write them as [0, 18) [18, 120).` };
    bands = edges.slice(1).map((to, i) => [edges[i], to]);
  }
  const checked = ageBandsSchema.safeParse(bands);
  if (!checked.success) return { error: checked.error.issues[0].message };
  return { bands };
}

export function formatBands(bands: readonly [number, number][] | null | undefined): string {
  return (bands ?? []).map(([a, b]) => `[${a}, ${b})`).join(" ");
}
