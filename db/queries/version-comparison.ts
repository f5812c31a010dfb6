import "server-only";
import { AppError } from "@/lib/api/errors";
import { compareVersions, scopeLabel, type ComparisonAnswer, type Labelled, type PartitionScope } from "@/lib/versions/comparison";
import type { Database, Executor } from "../client";
import { RECENT_SCORE_DAYS, recentScoreChanges, type RecentScoresAnswer } from "@/lib/versions/recent-scores";
import { listIncludedDonorAgesAndValues } from "./donor-results";
import { findIntervalVersion, listIntervalVersions, type VersionOut } from "./interval-versions";
import { loggedScoreGroups } from "./recent-scores";

export type VersionComparisonOut = ComparisonAnswer<VersionOut>;

const labelled = <T extends { partition: PartitionScope }>(row: T): Labelled<T> => ({ ...row, partition: { ...row.partition, label: scopeLabel(row.partition) } });

const DAY_MS = 86_400_000;

/**
 * The analyte's logged patient scores of the last RECENT_SCORE_DAYS days before `at` (against
 * whatever version was in force then), each re-flagged against this version.
 */
export async function recentScoresOf(executor: Executor, { version, at = new Date() }: { version: VersionOut; at?: Date }): Promise<RecentScoresAnswer> {
  const since = new Date(at.getTime() - RECENT_SCORE_DAYS * DAY_MS);
  const groups = await loggedScoreGroups(executor, { analyteCode: version.analyte.code, since, until: at });
  const result = recentScoreChanges({ next: version.partitions, critical: { low: version.criticalLow, high: version.criticalHigh }, groups });
  return {
    ...result,
    since: since.toISOString(),
    byPartition: result.byPartition.map(labelled),
    unmappedPartitions: result.unmappedPartitions.map((u) => ({ ...u, partition: u.partition ? { ...u.partition, label: scopeLabel(u.partition) } : null })),
  };
}

/**
 * The version beside the one in force of its analyte (or the one it followed): limits per
 * partition, the flag changes among the study's donors without an exclusion in effect, and among
 * the patient scores of the last 90 days. Run it in a repeatable-read transaction for one
 * snapshot (versionComparison does).
 */
export async function comparisonOf(executor: Executor, { version, at }: { version: VersionOut; at?: Date }): Promise<VersionComparisonOut> {
  const pending = version.state === "draft" || version.state === "awaiting_signoff";
  const others = await listIntervalVersions(executor, { query: { analyte: version.analyte.code } });
  const inForce = pending
    ? (others.find((v) => v.state === "in_force") ?? null)
    : (others.filter((v) => v.number < version.number && v.effectiveFrom !== null).sort((a, b) => b.number - a.number)[0] ?? null);
  if (inForce && inForce.unit !== version.unit) {
    throw new AppError("conflict", `Version ${inForce.number} of ${version.analyte.code} is in ${inForce.unit} and this one in ${version.unit}: the limits cannot be compared.`);
  }
  const donors = version.studyId ? await listIncludedDonorAgesAndValues(executor, { studyId: version.studyId }) : [];
  const result = compareVersions({ next: version.partitions, current: inForce ? inForce.partitions : null, donors });
  return {
    version: { id: version.id, number: version.number, state: version.state, analyte: version.analyte, unit: version.unit },
    inForce,
    basis: pending ? "in_force" : "previous",
    partitions: result.partitions.map(labelled),
    removedPartitions: result.removedPartitions.map(labelled),
    donorFlagChanges: { ...result.donorFlagChanges, byPartition: result.donorFlagChanges.byPartition.map(labelled) },
    recentScores: await recentScoresOf(executor, { version, at }),
  };
}

/** The comparison of one version (404 when unknown), in one read-only snapshot. */
export async function versionComparison(database: Database, { id }: { id: string }): Promise<VersionComparisonOut> {
  return database.transaction(async (tx) => comparisonOf(tx, { version: await findIntervalVersion(tx, { id }) }), {
    isolationLevel: "repeatable read",
    accessMode: "read only",
  });
}
