import type { Pool } from "pg";

/**
 * Tables whose rows the served app changes by itself, on a clock, whatever a request does: the
 * rate limiter's heartbeat and claims (lib/lis/rate-limit.ts, every 300 ms). They are counted
 * in no comparison; every other table is.
 */
export const BACKGROUND_TABLES = new Set(["rate_limit_counts"]);

/**
 * The audit hash chain's two tables (db/audit-chain.ts): an audit event queues itself in
 * audit_chain_pending in its own transaction, and the sealer moves it to audit_chain about a
 * second later. Their sum equals audit_events in every snapshot, so they are checked against it
 * and left out of the counts: audit_events stands for all three.
 */
const CHAIN_TABLES = ["audit_chain", "audit_chain_pending"];

/** Every base table of the public schema, listed from information_schema, so that a new table is counted too. */
export async function everyTable(pool: Pool): Promise<string[]> {
  const { rows } = await pool.query<{ table_name: string }>(
    `SELECT table_name FROM information_schema.tables
      WHERE table_schema = 'public' AND table_type = 'BASE TABLE'
        AND has_table_privilege(quote_ident(table_schema) || '.' || quote_ident(table_name), 'SELECT')
      ORDER BY table_name`,
  );
  return rows.map((r) => r.table_name);
}

/** The row count of every table but the background ones, in one snapshot (one statement). */
export async function countEveryTable(pool: Pool): Promise<Record<string, number>> {
  const tables = (await everyTable(pool)).filter((t) => !BACKGROUND_TABLES.has(t));
  const select = tables.map((t, i) => `(SELECT count(*)::int FROM public."${t.replace(/"/g, '""')}") AS c${i}`).join(", ");
  const [row] = (await pool.query(`SELECT ${select}`)).rows;
  const counts: Record<string, number> = Object.fromEntries(tables.map((t, i) => [t, row[`c${i}`] as number]));
  if (CHAIN_TABLES.every((t) => t in counts)) {
    const chained = counts.audit_chain + counts.audit_chain_pending;
    if (chained !== counts.audit_events) {
      throw new Error(`the audit chain holds ${chained} events (linked or queued) but audit_events ${counts.audit_events}`);
    }
    for (const t of CHAIN_TABLES) delete counts[t];
  }
  return counts;
}
