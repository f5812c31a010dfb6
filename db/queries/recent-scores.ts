import "server-only";
import { eq, sql } from "drizzle-orm";
import type { PartitionScope } from "@/lib/versions/comparison";
import type { LoggedScoreGroup } from "@/lib/versions/recent-scores";
import type { Executor } from "../client";
import { analytes } from "../schema";

/**
 * The analyte's logged scores in [since, until), grouped by the partition they were made in,
 * value, censoring and flag, each group with the scope (sex, age range in days) of its partition
 * (null when the partition is unknown). One pass over the range of score_log_analyte_time_idx
 * (analyte, time), aggregated in PostgreSQL, so that a million logged scores reach the app as the
 * far fewer distinct (partition, value, flag) groups: laboratory values repeat at their decimals.
 * The analyte's id is looked up first and passed as a value, so that the planner estimates its
 * share of the log from the column's statistics rather than guessing for an unknown id.
 */
export async function loggedScoreGroups(
  executor: Executor,
  { analyteCode, since, until }: { analyteCode: string; since: Date; until: Date },
): Promise<LoggedScoreGroup[]> {
  const [analyte] = await executor.select({ id: analytes.id }).from(analytes).where(eq(analytes.code, analyteCode));
  if (!analyte) return [];
  const result = await executor.execute<{
    sex: string | null;
    age_from_days: number | null;
    age_to_days: number | null;
    known: boolean;
    value: number;
    censored: "<" | ">" | null;
    flag: string;
    n: number;
  }>(sql`
    WITH grouped AS (
      SELECT l.partition_id, l.value, l.censored, l.flag, count(*)::int AS n
      FROM score_log l
      WHERE l.analyte_id = ${analyte.id}::uuid
        AND l.scored_at >= ${since.toISOString()}::timestamptz
        AND l.scored_at < ${until.toISOString()}::timestamptz
      GROUP BY l.partition_id, l.value, l.censored, l.flag
    )
    SELECT p.sex, p.age_from_days, p.age_to_days, p.id IS NOT NULL AS known, g.value, g.censored, g.flag, g.n
    FROM grouped g
    LEFT JOIN interval_partitions p ON p.id = g.partition_id
  `);
  return result.rows.map((r) => ({
    partition: r.known ? ({ sex: r.sex as PartitionScope["sex"], ageFromDays: r.age_from_days, ageToDays: r.age_to_days } satisfies PartitionScope) : null,
    value: r.value,
    censored: r.censored,
    flag: r.flag,
    count: r.n,
  }));
}
