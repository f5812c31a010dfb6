/**
 * What a new interval version would have changed among the patient scores of the last days: each
 * logged score (de-identified: value, censoring, flag and the partition that applied, from the
 * score log) re-flagged against the partition of the new version that covers the logged
 * partition's people, with lib/scoring's own flag rule (flagValue / flagCensored, the version's
 * critical limits included). Pure: plain data in, plain data out.
 *
 * A logged partition maps to a new partition when that partition holds every person the logged
 * one held: no sex restriction or the same one, and an age range that contains the logged range
 * (null is no bound). A logged score whose partition maps to exactly one new partition is
 * re-flagged; otherwise (none covers it, e.g. the new version splits an all-ages partition by age,
 * or its partition is unknown) it is counted as unmapped, since the log does not keep the
 * patient's age or sex to place it more finely.
 */
import { flagCensored, flagValue, type Flag } from "@/lib/scoring/flag";
import type { Limits } from "@/lib/scoring/model";
import type { ComparedPartition, PartitionScope } from "./comparison";

/** The window the review looks back over, in days. */
export const RECENT_SCORE_DAYS = 90;

/** Logged scores that share partition, value, censoring and flag, with how many there were. */
export interface LoggedScoreGroup {
  /** The scope of the partition the score was made in; null when the partition is not found. */
  partition: PartitionScope | null;
  value: number;
  censored: "<" | ">" | null;
  flag: string;
  count: number;
}

/** Transitions keyed "N→H" (logged flag → flag under the new version), changes only. */
export type TransitionCounts = Record<string, number>;

export interface RecentScoreChanges {
  days: number;
  /** Every logged score in the window, mapped or not. */
  total: number;
  /** Mapped scores whose flag under the new version differs from the logged one. */
  changed: number;
  /** Scores whose partition maps to no single partition of the new version (not re-flagged). */
  unmapped: number;
  transitions: TransitionCounts;
  /** One row per partition of the new version: the scores mapped to it. */
  byPartition: { partition: PartitionScope; total: number; changed: number; transitions: TransitionCounts }[];
  /** The logged partitions that map to no single new partition, with their score counts. */
  unmappedPartitions: { partition: PartitionScope | null; count: number }[];
}

const FLAG_ORDER: readonly string[] = ["LL", "L", "N", "H", "HH", "<", ">"];

/** Whether partition `outer` holds every person of partition `inner` (same or no sex restriction, containing age range). */
export function containsScope(outer: PartitionScope, inner: PartitionScope): boolean {
  if (outer.sex !== null && outer.sex !== inner.sex) return false;
  if (outer.ageFromDays !== null && (inner.ageFromDays === null || inner.ageFromDays < outer.ageFromDays)) return false;
  if (outer.ageToDays !== null && (inner.ageToDays === null || inner.ageToDays > outer.ageToDays)) return false;
  return true;
}

const scopeKey = (s: PartitionScope | null) => (s === null ? "unknown" : `${s.sex ?? "*"}|${s.ageFromDays ?? ""}|${s.ageToDays ?? ""}`);

function sortedTransitions(counts: Map<string, number>): TransitionCounts {
  const rank = (f: string) => {
    const i = FLAG_ORDER.indexOf(f);
    return i < 0 ? FLAG_ORDER.length : i;
  };
  const entries = [...counts.entries()].map(([key, n]) => ({ key, n, from: key.split("→")[0], to: key.split("→")[1] }));
  entries.sort((a, b) => rank(a.from) - rank(b.from) || rank(a.to) - rank(b.to) || a.key.localeCompare(b.key));
  return Object.fromEntries(entries.map((e) => [e.key, e.n]));
}

/**
 * Re-flags grouped logged scores against the new version.
 * Complexity: O(g + s·p) for g groups, s distinct logged partitions and p new partitions.
 */
const isAgeCurves = (p: ComparedPartition) => (p.model as { kind?: unknown } | null | undefined)?.kind === "lms";

export function recentScoreChanges({
  next,
  critical,
  groups,
  days = RECENT_SCORE_DAYS,
}: {
  next: readonly ComparedPartition[];
  critical: { low: number | null; high: number | null };
  groups: Iterable<LoggedScoreGroup>;
  days?: number;
}): RecentScoreChanges {
  const limitsOf = (p: ComparedPartition): Limits => ({
    low: p.low,
    high: p.high,
    ...(critical.low !== null ? { criticalLow: critical.low } : {}),
    ...(critical.high !== null ? { criticalHigh: critical.high } : {}),
  });
  const limits = next.map(limitsOf);
  const tallies = next.map(() => ({ total: 0, changed: 0, transitions: new Map<string, number>() }));
  const overall = new Map<string, number>();
  // Where each distinct logged partition maps: the new partition's index, or -1 for unmapped.
  const mapping = new Map<string, number>();
  const unmapped = new Map<string, { partition: PartitionScope | null; count: number }>();
  let total = 0;
  let unmappedCount = 0;
  for (const g of groups) {
    total += g.count;
    const key = scopeKey(g.partition);
    let target = mapping.get(key);
    if (target === undefined) {
      const covering = g.partition ? next.flatMap((p, i) => (containsScope(p, g.partition!) ? [i] : [])) : [];
      // LMS age curves need each patient's age, which the log does not keep: not re-flagged.
      target = covering.length === 1 && !isAgeCurves(next[covering[0]]) ? covering[0] : -1;
      mapping.set(key, target);
    }
    if (target < 0) {
      unmappedCount += g.count;
      const u = unmapped.get(key) ?? { partition: g.partition, count: 0 };
      u.count += g.count;
      unmapped.set(key, u);
      continue;
    }
    const to: Flag = g.censored ? flagCensored(g.censored, g.value, limits[target]) : flagValue(g.value, limits[target]);
    const tally = tallies[target];
    tally.total += g.count;
    if (to === g.flag) continue;
    tally.changed += g.count;
    const transition = `${g.flag}→${to}`;
    tally.transitions.set(transition, (tally.transitions.get(transition) ?? 0) + g.count);
    overall.set(transition, (overall.get(transition) ?? 0) + g.count);
  }
  const byPartition = next.map((p, i) => ({
    partition: { sex: p.sex, ageFromDays: p.ageFromDays, ageToDays: p.ageToDays },
    total: tallies[i].total,
    changed: tallies[i].changed,
    transitions: sortedTransitions(tallies[i].transitions),
  }));
  return {
    days,
    total,
    changed: byPartition.reduce((s, p) => s + p.changed, 0),
    unmapped: unmappedCount,
    transitions: sortedTransitions(overall),
    byPartition,
    unmappedPartitions: [...unmapped.values()].sort((a, b) => b.count - a.count),
  };
}

type WithLabel<T> = T & { label: string };

/** The answer's shape (GET …/comparison `recentScores`): partitions also in words, and the window's start. */
export interface RecentScoresAnswer extends Omit<RecentScoreChanges, "byPartition" | "unmappedPartitions"> {
  /** The window's start (ISO 8601); it ends at the moment of the answer. */
  since: string;
  byPartition: (Omit<RecentScoreChanges["byPartition"][number], "partition"> & { partition: WithLabel<PartitionScope> })[];
  unmappedPartitions: { partition: WithLabel<PartitionScope> | null; count: number }[];
}

/** Flags in words, for sentences about transitions. */
export const FLAG_WORDS: Record<string, string> = {
  LL: "critical low",
  L: "low",
  N: "normal",
  H: "high",
  HH: "critical high",
  "<": "below the measuring range",
  ">": "above the measuring range",
};

const count = (n: number, one: string, many: string) => `${n.toLocaleString("en")} ${n === 1 ? one : many}`;

/** "20 normal → high, 3 low → normal", or "none" for no transition. */
export function transitionsSentence(transitions: TransitionCounts): string {
  const parts = Object.entries(transitions).map(([key, n]) => {
    const [from, to] = key.split("→");
    return `${n.toLocaleString("en")} ${FLAG_WORDS[from] ?? from} → ${FLAG_WORDS[to] ?? to}`;
  });
  return parts.length ? parts.join(", ") : "none";
}

/**
 * The figures in plain sentences: "Of 412 scores in the last 90 days, 37 would change flag: …",
 * then, when some were not re-flagged, how many and why.
 */
export function recentScoresSentences(recent: Pick<RecentScoreChanges, "days" | "total" | "changed" | "unmapped" | "transitions">): string[] {
  if (recent.total === 0) return [`No patient scores were logged in the last ${recent.days} days: there is nothing to re-flag.`];
  const changed =
    recent.changed === 0
      ? `Of ${count(recent.total, "score", "scores")} in the last ${recent.days} days, none would change flag.`
      : `Of ${count(recent.total, "score", "scores")} in the last ${recent.days} days, ${recent.changed.toLocaleString("en")} would change flag: ${transitionsSentence(recent.transitions)}.`;
  if (recent.unmapped === 0) return [changed];
  return [
    changed,
    `${count(recent.unmapped, "score was", "scores were")} made in partitions that no single partition of this version covers and ${recent.unmapped === 1 ? "is" : "are"} not re-flagged.`,
  ];
}
