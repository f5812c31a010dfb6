import "server-only";
import { and, asc, count, desc, eq, gte, lte, sql, type SQL } from "drizzle-orm";
import type { DonorResultSortField, DonorResultsQuery } from "@/lib/studies/donor-results-query";
import type { Executor } from "../client";
import { donorResults, type DonorResult } from "../schema";

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

/**
 * One page of a study's donor results. Exclusions do not exist yet: every result counts as not
 * excluded, so `excluded: true` gives an empty page and `excluded: false` everything.
 */
export async function listDonorResults(
  executor: Executor,
  { studyId, query }: { studyId: string; query: DonorResultsQuery },
): Promise<{ items: (DonorResult & { excluded: boolean })[]; total: number; page: number; pageSize: number }> {
  const parts: SQL[] = [eq(donorResults.studyId, studyId)];
  if (query.sex) parts.push(eq(donorResults.sex, query.sex));
  if (query.ageFrom !== undefined) parts.push(gte(donorResults.ageYears, query.ageFrom));
  if (query.ageTo !== undefined) parts.push(lte(donorResults.ageYears, query.ageTo));
  if (query.excluded === true) parts.push(sql`false`);
  const where = and(...parts);

  const descending = query.sort.startsWith("-");
  const column = SORT_COLUMNS[query.sort.replace(/^-/, "") as DonorResultSortField];
  const [{ total }] = await executor.select({ total: count() }).from(donorResults).where(where);
  const rows = await executor
    .select()
    .from(donorResults)
    .where(where)
    .orderBy(descending ? desc(column) : asc(column), asc(donorResults.id))
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize);
  return { items: rows.map((r) => ({ ...r, excluded: false })), total, page: query.page, pageSize: query.pageSize };
}
