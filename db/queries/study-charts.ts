import "server-only";
import { and, asc, eq, gte, inArray, lt, sql, type SQL } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import type { Executor } from "../client";
import { donorResults, estimates, exclusions } from "../schema";

/**
 * Whether an exclusion of the donor result is in effect. Written with qualified names: Drizzle
 * leaves a single table's columns unqualified in a select list, where "id" would be the
 * exclusion's own.
 */
const excludedNow = sql<boolean>`EXISTS (SELECT 1 FROM exclusions AS e WHERE e.donor_result_id = "donor_results"."id" AND e.undone_at IS NULL)`;

export interface ChartPartition {
  sex?: "F" | "M";
  ageFrom?: number;
  ageTo?: number;
}

export interface PartitionValues {
  /** Measured values in ascending order. */
  measured: number[];
  censored: { below: number; above: number };
}

function partitionWhere(studyId: string, p: ChartPartition): SQL[] {
  const parts: SQL[] = [eq(donorResults.studyId, studyId)];
  if (p.sex) parts.push(eq(donorResults.sex, p.sex));
  if (p.ageFrom !== undefined) parts.push(gte(donorResults.ageYears, p.ageFrom));
  if (p.ageTo !== undefined) parts.push(lt(donorResults.ageYears, p.ageTo));
  return parts;
}

async function valuesWhere(executor: Executor, where: SQL[]): Promise<PartitionValues> {
  const rows = await executor
    .select({ value: donorResults.value, side: donorResults.censoringSide })
    .from(donorResults)
    .where(and(...where))
    .orderBy(asc(donorResults.value));
  const measured: number[] = [];
  const censored = { below: 0, above: 0 };
  for (const r of rows) {
    if (r.side === "below") censored.below++;
    else if (r.side === "above") censored.above++;
    else measured.push(r.value);
  }
  return { measured, censored };
}

/** The partition's donor results that no exclusion in effect sets aside: measured values sorted, censored ones counted. */
export async function partitionValues(
  executor: Executor,
  { studyId, partition }: { studyId: string; partition: ChartPartition },
): Promise<PartitionValues> {
  return valuesWhere(executor, [...partitionWhere(studyId, partition), sql`NOT ${excludedNow}`]);
}

export interface EstimateValues extends PartitionValues {
  estimate: { id: string; partition: ChartPartition; document: Record<string, unknown> };
}

/**
 * The values an estimate was made from: its partition's donor results less the exclusions that
 * were in effect when it was made (its `exclusionIds`), whatever has been excluded or undone since.
 * 404 when the study has no such estimate.
 */
export async function estimateValues(
  executor: Executor,
  { studyId, estimateId }: { studyId: string; estimateId: string },
): Promise<EstimateValues> {
  const [row] = await executor
    .select()
    .from(estimates)
    .where(and(eq(estimates.id, estimateId), eq(estimates.studyId, studyId)))
    .limit(1);
  if (!row) throw new AppError("not_found", `The study has no estimate with the id ${estimateId}.`);
  const partition: ChartPartition = {};
  if (row.sex === "F" || row.sex === "M") partition.sex = row.sex;
  if (row.ageFrom !== null) partition.ageFrom = row.ageFrom;
  if (row.ageTo !== null) partition.ageTo = row.ageTo;
  const where = partitionWhere(studyId, partition);
  if (row.exclusionIds.length > 0) {
    const excludedIds = executor
      .select({ id: exclusions.donorResultId })
      .from(exclusions)
      .where(and(eq(exclusions.studyId, studyId), inArray(exclusions.id, row.exclusionIds)));
    where.push(sql`${donorResults.id} NOT IN ${excludedIds}`);
  }
  const values = await valuesWhere(executor, where);
  return { ...values, estimate: { id: row.id, partition, document: row.document } };
}

/** The study's donor results with the given donor codes, and whether an exclusion is in effect for each. */
export async function donorResultsByCode(
  executor: Executor,
  { studyId, codes }: { studyId: string; codes: string[] },
): Promise<{ id: number; donorCode: string; sex: string; ageYears: number; value: number; excluded: boolean }[]> {
  return executor
    .select({
      id: donorResults.id,
      donorCode: donorResults.donorCode,
      sex: donorResults.sex,
      ageYears: donorResults.ageYears,
      value: donorResults.value,
      excluded: excludedNow,
    })
    .from(donorResults)
    .where(and(eq(donorResults.studyId, studyId), inArray(donorResults.donorCode, codes)))
    .orderBy(asc(donorResults.donorCode), asc(donorResults.id));
}

