/**
 * What a new interval version changes against the one in force: the limits side by side per
 * partition (partitions matched by sex and age range), and how many of the study's donors would
 * be flagged differently (L/N/H against inclusive limits, lib/scoring's flagValue) under the new
 * limits than under the old. Pure: plain data in, plain data out.
 *
 * A donor is placed the way scoring places a patient: by sex and by age in days in the half-open
 * range [ageFromDays, ageToDays) of a partition (null is no bound). Its flag under the old version
 * is that of the old partition it falls in; a donor no old partition covers has no old flag and
 * counts as changed (scoring would have answered "no interval" for that person). A censored value
 * is flagged at its censoring limit, as the scoring models take it.
 */
import { flagValue } from "@/lib/scoring/flag";
import { lmsModelOf } from "@/lib/scoring/lms-curves-view";
import { lmsLimitsAt } from "@/lib/scoring/score";
import type { RecentScoresAnswer } from "./recent-scores";
import { partitionLabel } from "@/lib/studies/partitions";
import { DAYS_PER_YEAR } from "./age-days";

export type SimpleFlag = "L" | "N" | "H";

export interface ComparedPartition {
  sex: "F" | "M" | null;
  ageFromDays: number | null;
  ageToDays: number | null;
  low: number | null;
  high: number | null;
  /** The scoring model: for LMS age curves (method lms) the limits are read at each donor's exact age. */
  model?: unknown;
}

export interface ComparedDonor {
  sex: string;
  ageDays: number;
  /** The exact age, for partitions of LMS age curves. */
  ageYears?: number;
  value: number;
}

export interface PartitionScope {
  sex: "F" | "M" | null;
  ageFromDays: number | null;
  ageToDays: number | null;
}

export interface LimitsPair {
  low: number | null;
  high: number | null;
}

export interface FlagTransition {
  from: SimpleFlag | null;
  to: SimpleFlag;
  count: number;
}

export interface PartitionFlagChanges {
  partition: PartitionScope;
  total: number;
  changed: number;
  transitions: FlagTransition[];
}

export interface VersionComparisonResult {
  /** One row per partition of the new version, with the old limits of the same scope, or null. */
  partitions: { partition: PartitionScope; old: LimitsPair | null; new: LimitsPair }[];
  /** Partitions of the version in force that the new version has no counterpart for. */
  removedPartitions: { partition: PartitionScope; old: LimitsPair }[];
  donorFlagChanges: {
    /** Donors (without an exclusion in effect) that fall in a partition of the new version. */
    total: number;
    changed: number;
    /** Donors no partition of the new version covers (not counted in total). */
    notCovered: number;
    byPartition: PartitionFlagChanges[];
  };
}

const scopeOf = (p: ComparedPartition): PartitionScope => ({ sex: p.sex, ageFromDays: p.ageFromDays, ageToDays: p.ageToDays });
const limitsOf = (p: ComparedPartition): LimitsPair => ({ low: p.low, high: p.high });

/** Whether two partitions hold the same people: same sex restriction and same age range. */
export function sameScope(a: PartitionScope, b: PartitionScope): boolean {
  return a.sex === b.sex && a.ageFromDays === b.ageFromDays && a.ageToDays === b.ageToDays;
}

/** Whether a person of this sex and age in days belongs to the partition. */
export function covers(p: PartitionScope, sex: string, ageDays: number): boolean {
  if (p.sex !== null && p.sex !== sex) return false;
  if (p.ageFromDays !== null && ageDays < p.ageFromDays) return false;
  if (p.ageToDays !== null && ageDays >= p.ageToDays) return false;
  return true;
}

/**
 * Whether a donor belongs to a partition. For LMS age curves the donor's exact age in years must
 * lie within the curves' (as scoring decides); an upload's exact age counts birthdays passed, so
 * it can sit a day away from days/365.25 at the curves' ends.
 */
function coversDonor(p: ComparedPartition, d: ComparedDonor): boolean {
  const curves = lmsModelOf(p.model);
  if (!curves || d.ageYears === undefined) return covers(p, d.sex, d.ageDays);
  return (p.sex === null || p.sex === d.sex) && d.ageYears >= curves.ageMin && d.ageYears <= curves.ageMax;
}

/** L, N or H of a value against inclusive limits (no critical limits here). */
export function simpleFlag(value: number, limits: LimitsPair): SimpleFlag {
  return flagValue(value, { low: limits.low, high: limits.high }) as SimpleFlag;
}

/**
 * Compares `next` (the version under review) with `current` (the version in force, or null when
 * none is) over the study's donors.
 * Complexity: O(d·(p + q)) for d donors, p new and q old partitions.
 */
/**
 * The limits a donor is flagged against in a partition: fixed limits, or for LMS age curves the
 * 2.5th and 97.5th centiles at the donor's exact age (null when the age is not within the curves).
 */
function limitsForDonor(p: ComparedPartition, d: ComparedDonor): LimitsPair | null {
  const curves = lmsModelOf(p.model);
  if (!curves) return limitsOf(p);
  if (d.ageYears === undefined || !(d.ageYears >= curves.ageMin && d.ageYears <= curves.ageMax)) return null;
  const at = lmsLimitsAt(curves, d.ageYears);
  return { low: at.low, high: at.high };
}

export function compareVersions({
  next,
  current,
  donors,
}: {
  next: readonly ComparedPartition[];
  current: readonly ComparedPartition[] | null;
  donors: readonly ComparedDonor[];
}): VersionComparisonResult {
  const old = current ?? [];
  const partitions = next.map((p) => {
    const match = old.find((o) => sameScope(o, p));
    return { partition: scopeOf(p), old: match ? limitsOf(match) : null, new: limitsOf(p) };
  });
  const removedPartitions = old.filter((o) => !next.some((p) => sameScope(o, p))).map((o) => ({ partition: scopeOf(o), old: limitsOf(o) }));

  const tallies = next.map(() => ({ total: 0, changed: 0, transitions: new Map<string, FlagTransition>() }));
  let notCovered = 0;
  for (const d of donors) {
    const i = next.findIndex((p) => coversDonor(p, d));
    const newLimits = i < 0 ? null : limitsForDonor(next[i], d);
    if (newLimits === null) {
      notCovered++;
      continue;
    }
    const to = simpleFlag(d.value, newLimits);
    const oldPartition = current ? old.find((o) => coversDonor(o, d)) : undefined;
    const oldLimits = oldPartition ? limitsForDonor(oldPartition, d) : null;
    const from = oldLimits ? simpleFlag(d.value, oldLimits) : null;
    const tally = tallies[i];
    tally.total++;
    // Without a version in force there is nothing to change from: nothing counts as changed.
    if (current === null || from === to) continue;
    tally.changed++;
    const key = `${from}>${to}`;
    const t = tally.transitions.get(key) ?? { from, to, count: 0 };
    t.count++;
    tally.transitions.set(key, t);
  }
  const order = (f: SimpleFlag | null) => (f === null ? 3 : ["L", "N", "H"].indexOf(f));
  const byPartition = next.map((p, i) => ({
    partition: scopeOf(p),
    total: tallies[i].total,
    changed: tallies[i].changed,
    transitions: [...tallies[i].transitions.values()].sort((a, b) => order(a.from) - order(b.from) || order(a.to) - order(b.to)),
  }));
  return {
    partitions,
    removedPartitions,
    donorFlagChanges: {
      total: byPartition.reduce((s, p) => s + p.total, 0),
      changed: byPartition.reduce((s, p) => s + p.changed, 0),
      notCovered,
      byPartition,
    },
  };
}

/**
 * A partition's scope in words, from its age range in days (shown in years to two decimals, by
 * age-days.ts's rule read backwards): "F, age 18 to under 65", "All donors".
 */
export function scopeLabel(scope: PartitionScope): string {
  const years = (days: number | null) => (days === null ? undefined : Math.round((days / DAYS_PER_YEAR) * 100) / 100);
  return partitionLabel({ sex: scope.sex ?? undefined, ageFrom: years(scope.ageFromDays), ageTo: years(scope.ageToDays) });
}

/** A row of the comparison with its partition's scope also in words. */
export type Labelled<T extends { partition: PartitionScope }> = Omit<T, "partition"> & { partition: PartitionScope & { label: string } };

/** The comparison as the API answers it; `V` is the version's shape (the in-force one included). */
export interface ComparisonAnswer<V> {
  version: { id: string; number: number; state: string; analyte: { code: string; name: string }; unit: string };
  /**
   * What the version is compared with: for a draft or a version awaiting sign-off, the version in
   * force now ("in_force"); for one that is or was in force, the version in force before it
   * ("previous"). Null when there is none.
   */
  inForce: V | null;
  basis: "in_force" | "previous";
  partitions: Labelled<VersionComparisonResult["partitions"][number]>[];
  removedPartitions: Labelled<VersionComparisonResult["removedPartitions"][number]>[];
  donorFlagChanges: Omit<VersionComparisonResult["donorFlagChanges"], "byPartition"> & {
    byPartition: Labelled<VersionComparisonResult["donorFlagChanges"]["byPartition"][number]>[];
  };
  /** The patient scores of the last 90 days re-flagged against this version (lib/versions/recent-scores.ts). */
  recentScores: RecentScoresAnswer;
}
