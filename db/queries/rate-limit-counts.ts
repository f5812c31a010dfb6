import "server-only";
import { lt, sql } from "drizzle-orm";
import type { Executor } from "../client";
import { rateLimitCounts } from "../schema";

/**
 * The row each instance writes on every sync whatever its traffic, so that the others know it is
 * alive and count it when they share out a limit. No LIS connection has this id.
 */
export const HEARTBEAT_CONNECTION_ID = "00000000-0000-0000-0000-000000000000";

/**
 * What an instance has truly admitted of a connection is kept in a row of its own beside the
 * claim, under its instance id with this suffix (the table has one count per row).
 */
export const ADMITTED_SUFFIX = "#admitted";

export interface InstanceCount {
  connectionId: string;
  /** The claim: admitted so far plus what may be admitted before the next sync. */
  count: number;
  /** Admitted so far. */
  admitted: number;
}

/**
 * Writes this instance's counts for one window together with its heartbeat row, in one
 * statement. Each count is the instance's claim (lib/lis/rate-limit.ts): what it has admitted
 * plus what it may admit before its next sync, an upper bound of its true count; absolute, so a
 * repeated write changes nothing.
 */
export async function recordRateLimitCounts(
  executor: Executor,
  { instanceId, windowStart, counts }: { instanceId: string; windowStart: Date; counts: readonly InstanceCount[] },
): Promise<void> {
  const rows = [
    { connectionId: HEARTBEAT_CONNECTION_ID, windowStart, instanceId, count: 0 },
    ...counts.flatMap((c) => [
      { connectionId: c.connectionId, windowStart, instanceId, count: c.count },
      { connectionId: c.connectionId, windowStart, instanceId: `${instanceId}${ADMITTED_SUFFIX}`, count: c.admitted },
    ]),
  ];
  await executor
    .insert(rateLimitCounts)
    .values(rows)
    .onConflictDoUpdate({
      target: [rateLimitCounts.connectionId, rateLimitCounts.windowStart, rateLimitCounts.instanceId],
      set: { count: sql`excluded.count`, updatedAt: sql`now()` },
    });
}

/**
 * What the other instances hold in a window, per connection: `others` sums the claims of those
 * alive (a heartbeat within the last `liveSeconds` by the database's clock) and what the stopped
 * ones had admitted, `othersAdmitted` what all of them had admitted; and how many instances, this
 * one included, are alive. A stopped instance plans no more, so its claim's unused part would
 * otherwise hold the limit back until the window ends.
 */
export async function readRateLimitWindow(
  executor: Executor,
  { instanceId, windowStart, liveSeconds }: { instanceId: string; windowStart: Date; liveSeconds: number },
): Promise<{ others: Map<string, number>; othersAdmitted: Map<string, number>; liveInstances: number }> {
  const admittedId = `${instanceId}${ADMITTED_SUFFIX}`;
  const suffixPattern = `%${ADMITTED_SUFFIX}`;
  const result = await executor.execute<{ connection_id: string | null; claimed: number; admitted: number | null }>(sql`
    WITH live AS (
      SELECT DISTINCT instance_id FROM ${rateLimitCounts}
       WHERE connection_id = ${HEARTBEAT_CONNECTION_ID} AND updated_at >= now() - make_interval(secs => ${liveSeconds})
         AND instance_id <> ${instanceId}
    ), rows AS (
      SELECT connection_id, count, instance_id LIKE ${suffixPattern} AS is_admitted,
             CASE WHEN instance_id LIKE ${suffixPattern} THEN left(instance_id, ${sql.raw(String(-ADMITTED_SUFFIX.length))}) ELSE instance_id END AS instance
        FROM ${rateLimitCounts}
       WHERE window_start = ${windowStart} AND connection_id <> ${HEARTBEAT_CONNECTION_ID}
         AND instance_id <> ${instanceId} AND instance_id <> ${admittedId}
    )
    SELECT connection_id::text AS connection_id,
           (coalesce(sum(count) FILTER (WHERE NOT is_admitted AND instance IN (SELECT instance_id FROM live)), 0)
            + coalesce(sum(count) FILTER (WHERE is_admitted AND instance NOT IN (SELECT instance_id FROM live)), 0))::int AS claimed,
           coalesce(sum(count) FILTER (WHERE is_admitted), 0)::int AS admitted
      FROM rows GROUP BY connection_id
    UNION ALL
    SELECT NULL, (SELECT count(*) FROM live)::int, NULL`);
  const others = new Map<string, number>();
  const othersAdmitted = new Map<string, number>();
  let liveOthers = 0;
  for (const row of result.rows) {
    if (row.connection_id === null) liveOthers = Number(row.claimed);
    else {
      others.set(row.connection_id, Number(row.claimed));
      othersAdmitted.set(row.connection_id, Number(row.admitted));
    }
  }
  return { others, othersAdmitted, liveInstances: liveOthers + 1 };
}

/** Removes the rows of windows that ended long ago. */
export async function deleteRateLimitCountsBefore(executor: Executor, { before }: { before: Date }): Promise<number> {
  const deleted = await executor.delete(rateLimitCounts).where(lt(rateLimitCounts.windowStart, before)).returning({ id: rateLimitCounts.instanceId });
  return deleted.length;
}
