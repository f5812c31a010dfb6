import "server-only";
import { AppError } from "@/lib/api/errors";
import { compareVersions, scopeLabel, type ComparisonAnswer, type Labelled, type PartitionScope } from "@/lib/versions/comparison";
import type { Database, Executor } from "../client";
import { listIncludedDonorAgesAndValues } from "./donor-results";
import { findIntervalVersion, listIntervalVersions, type VersionOut } from "./interval-versions";

export type VersionComparisonOut = ComparisonAnswer<VersionOut>;

const labelled = <T extends { partition: PartitionScope }>(row: T): Labelled<T> => ({ ...row, partition: { ...row.partition, label: scopeLabel(row.partition) } });

/**
 * The version beside the one in force of its analyte (or the one it followed): limits per
 * partition and the flag changes among the study's donors without an exclusion in effect. Run it
 * in a repeatable-read transaction for one snapshot (versionComparison does).
 */
export async function comparisonOf(executor: Executor, { version }: { version: VersionOut }): Promise<VersionComparisonOut> {
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
  };
}

/** The comparison of one version (404 when unknown), in one read-only snapshot. */
export async function versionComparison(database: Database, { id }: { id: string }): Promise<VersionComparisonOut> {
  return database.transaction(async (tx) => comparisonOf(tx, { version: await findIntervalVersion(tx, { id }) }), {
    isolationLevel: "repeatable read",
    accessMode: "read only",
  });
}
