import "server-only";
import { and, asc, count, desc, eq, gte, isNull, lt, lte, sql, type SQL } from "drizzle-orm";
import type { DonorResultSortField, DonorResultsQuery } from "@/lib/studies/donor-results-query";
import type { Partition } from "@/lib/studies/partitions";
import type { Executor } from "../client";
import { donorResults, exclusions, type DonorResult } from "../schema";

const SORT_COLUMNS = {
  rowNumber: donorResults.rowNumber,
  donorCode: donorResults.donorCode,
  sex: donorResults.sex,
  ageYears: donorResults.ageYears,
  ageDays: donorResults.ageDays,
  collectedOn: donorResults.collectedOn,
  value: donorResults.value,
  id: donorResults.id,
} satisfies Record<DonorResultSortField, unknown>;

/** The join that finds a donor result's exclusion in effect (through exclusions_active_unique). */
const activeExclusion = and(eq(exclusions.donorResultId, donorResults.id), isNull(exclusions.undoneAt));
/** The same, as a subquery for EXISTS (at most one row: the partial unique index). */
const hasActiveExclusion = sql`(SELECT 1 FROM ${exclusions} WHERE ${exclusions.donorResultId} = ${donorResults.id} AND ${exclusions.undoneAt} IS NULL)`;

export interface DonorResultItem extends DonorResult {
  excluded: boolean;
  exclusion: { id: string; source: "manual" | "outlier"; reason: string } | null;
}

/**
 * One page of a study's donor results, each with its exclusion in effect (or null). `excluded`
 * keeps only the excluded (true) or only the included (false) ones.
 */
export async function listDonorResults(
  executor: Executor,
  { studyId, query }: { studyId: string; query: DonorResultsQuery },
): Promise<{ items: DonorResultItem[]; total: number; page: number; pageSize: number }> {
  const parts: SQL[] = [eq(donorResults.studyId, studyId)];
  if (query.sex) parts.push(eq(donorResults.sex, query.sex));
  if (query.ageFrom !== undefined) parts.push(gte(donorResults.ageYears, query.ageFrom));
  if (query.ageTo !== undefined) parts.push(lte(donorResults.ageYears, query.ageTo));
  // EXISTS / NOT EXISTS rather than a test on the joined row: PostgreSQL plans them as semi and
  // anti joins through exclusions_active_unique, with row estimates that keep the page's plan right.
  if (query.excluded === true) parts.push(sql`EXISTS ${hasActiveExclusion}`);
  if (query.excluded === false) parts.push(sql`NOT EXISTS ${hasActiveExclusion}`);
  const where = and(...parts);

  const descending = query.sort.startsWith("-");
  const column = SORT_COLUMNS[query.sort.replace(/^-/, "") as DonorResultSortField];
  const [[{ total }], rows] = await Promise.all([
    executor.select({ total: count() }).from(donorResults).where(where),
    executor
      .select({
        donorResult: donorResults,
        exclusionId: exclusions.id,
        exclusionSource: exclusions.source,
        exclusionReason: exclusions.reason,
      })
      .from(donorResults)
      .leftJoin(exclusions, activeExclusion)
      .where(where)
      .orderBy(descending ? desc(column) : asc(column), asc(donorResults.id))
      .limit(query.pageSize)
      .offset((query.page - 1) * query.pageSize),
  ]);
  return {
    items: rows.map((r) => ({
      ...r.donorResult,
      excluded: r.exclusionId !== null,
      exclusion:
        r.exclusionId === null ? null : { id: r.exclusionId, source: r.exclusionSource!, reason: r.exclusionReason! },
    })),
    total,
    page: query.page,
    pageSize: query.pageSize,
  };
}

/** SQL conditions for the donor results of one partition: sex, and age in [ageFrom, ageTo). */
export function partitionConditions(partition: Partition | undefined): SQL[] {
  const parts: SQL[] = [];
  if (partition?.sex) parts.push(eq(donorResults.sex, partition.sex));
  if (partition?.ageFrom !== undefined) parts.push(gte(donorResults.ageYears, partition.ageFrom));
  if (partition?.ageTo !== undefined) parts.push(lt(donorResults.ageYears, partition.ageTo));
  return parts;
}

export interface IncludedDonorValue {
  id: number;
  donorCode: string;
  sex: string;
  ageYears: number;
  value: number;
  censoringSide: "below" | "above" | null;
}

/**
 * The donor results of a study (or of one of its partitions) that have no exclusion in effect,
 * in donor_results.id order: what screens, partition assessments and estimates work on.
 */
export async function listIncludedDonorValues(
  executor: Executor,
  { studyId, partition }: { studyId: string; partition?: Partition },
): Promise<IncludedDonorValue[]> {
  return executor
    .select({
      id: donorResults.id,
      donorCode: donorResults.donorCode,
      sex: donorResults.sex,
      ageYears: donorResults.ageYears,
      value: donorResults.value,
      censoringSide: donorResults.censoringSide,
    })
    .from(donorResults)
    .where(
      and(
        eq(donorResults.studyId, studyId),
        ...partitionConditions(partition),
        sql`NOT EXISTS ${hasActiveExclusion}`,
      ),
    )
    .orderBy(asc(donorResults.id));
}

/**
 * Sex, age in days and value of every donor result of a study without an exclusion in effect, in
 * id order: the people a new interval would flag, placed as scoring places a patient.
 */
export async function listIncludedDonorAgesAndValues(
  executor: Executor,
  { studyId }: { studyId: string },
): Promise<{ sex: string; ageDays: number; ageYears: number; value: number }[]> {
  return executor
    .select({ sex: donorResults.sex, ageDays: donorResults.ageDays, ageYears: donorResults.ageYears, value: donorResults.value })
    .from(donorResults)
    .where(and(eq(donorResults.studyId, studyId), sql`NOT EXISTS ${hasActiveExclusion}`))
    .orderBy(asc(donorResults.id));
}
