import "server-only";
import { lt, sql } from "drizzle-orm";
import type { Executor } from "../client";
import { rateLimitCounts } from "../schema";

/**
 * The row each instance writes on every sync whatever its traffic, so that the others know it is
 * alive and count it when they share out a limit. No LIS connection has this id.
 */
export const HEARTBEAT_CONNECTION_ID = "00000000-0000-0000-0000-000000000000";

export interface InstanceCount {
  connectionId: string;
  count: number;
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
  const rows = [{ connectionId: HEARTBEAT_CONNECTION_ID, count: 0 }, ...counts].map((c) => ({
    connectionId: c.connectionId,
    windowStart,
    instanceId,
    count: c.count,
  }));
  await executor
    .insert(rateLimitCounts)
    .values(rows)
    .onConflictDoUpdate({
      target: [rateLimitCounts.connectionId, rateLimitCounts.windowStart, rateLimitCounts.instanceId],
      set: { count: sql`excluded.count`, updatedAt: sql`now()` },
    });
}

/**
 * What the other instances claimed in a window, summed per connection, and how many instances
 * (this one included) wrote a row within the last `liveSeconds` by the database's clock.
 */
export async function readRateLimitWindow(
  executor: Executor,
  { instanceId, windowStart, liveSeconds }: { instanceId: string; windowStart: Date; liveSeconds: number },
): Promise<{ others: Map<string, number>; liveInstances: number }> {
  const result = await executor.execute<{ connection_id: string | null; total: number }>(sql`
    SELECT connection_id::text AS connection_id, sum(count)::int AS total
      FROM ${rateLimitCounts}
     WHERE window_start = ${windowStart} AND instance_id <> ${instanceId}
       AND connection_id <> ${HEARTBEAT_CONNECTION_ID}
     GROUP BY connection_id
    UNION ALL
    SELECT NULL, count(DISTINCT instance_id)::int
      FROM ${rateLimitCounts}
     WHERE updated_at >= now() - make_interval(secs => ${liveSeconds}) AND instance_id <> ${instanceId}`);
  const others = new Map<string, number>();
  let liveOthers = 0;
  for (const row of result.rows) {
    if (row.connection_id === null) liveOthers = Number(row.total);
    else others.set(row.connection_id, Number(row.total));
  }
  return { others, liveInstances: liveOthers + 1 };
}

/** Removes the rows of windows that ended long ago. */
export async function deleteRateLimitCountsBefore(executor: Executor, { before }: { before: Date }): Promise<number> {
  const deleted = await executor.delete(rateLimitCounts).where(lt(rateLimitCounts.windowStart, before)).returning({ id: rateLimitCounts.instanceId });
  return deleted.length;
}
