import "server-only";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { from as copyFrom } from "pg-copy-streams";
import type { Database } from "../client";

/** The score_log columns in the order of each COPY line (lib/scores/score-log.ts writes the lines). */
export const SCORE_LOG_COPY_COLUMNS = [
  "scored_at",
  "analyte_id",
  "version_id",
  "partition_id",
  "value",
  "censored",
  "flag",
  "z",
  "percentile",
  "caller_kind",
  "caller_id",
  "channel",
] as const;

/**
 * Appends score-log rows with one COPY … FROM STDIN (PostgreSQL's text format: tab-separated,
 * `\N` for null, one row a line). One statement, so either every row is stored or none.
 * Returns the number of rows written.
 */
export async function copyScoreLogLines(database: Database, { chunks }: { chunks: Iterable<string> }): Promise<number> {
  const client = await database.$client.connect();
  let broken: Error | undefined;
  try {
    const copy = client.query(copyFrom(`COPY score_log (${SCORE_LOG_COPY_COLUMNS.join(", ")}) FROM STDIN`));
    await pipeline(Readable.from(chunks), copy);
    return copy.rowCount;
  } catch (err) {
    broken = err instanceof Error ? err : new Error(String(err));
    throw err;
  } finally {
    client.release(broken);
  }
}
