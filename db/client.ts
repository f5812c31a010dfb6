import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool, type PoolClient } from "pg";
import { env } from "@/lib/env";
import * as schema from "./schema";

/** The app's handle: Drizzle over a pool (`$client`). */
export type Database = NodePgDatabase<typeof schema> & { $client: Pool };
/** A database handle or an open transaction: queries accept either. */
export type Executor = NodePgDatabase<typeof schema> | Parameters<Parameters<Database["transaction"]>[0]>[0];

/** Longest wait for a connection of the pool (a new one, or a free one when all are in use). */
export const CONNECT_TIMEOUT_MS = 10_000;

// One pool per process, kept across hot reloads in development.
const globalForDb = globalThis as unknown as { bellwetherPool?: Pool; bellwetherDb?: Database };

export function db(): Database {
  if (!globalForDb.bellwetherDb) {
    // A request must never wait without end: a database that does not answer a connection (a
    // network that drops packets rather than refusing) or a pool whose connections are all held
    // ends the wait after CONNECT_TIMEOUT_MS with an error answered 503 with Retry-After
    // (lib/api/unavailable.ts). TCP keep-alive finds a connection whose peer vanished silently.
    const pool = new Pool({ connectionString: env().DATABASE_URL, max: 10, connectionTimeoutMillis: CONNECT_TIMEOUT_MS, keepAlive: true });
    // An idle connection that the database drops (a restart, an outage) is an 'error' event on the
    // pool; unhandled it would end the process, which must instead go on answering what it can
    // from memory (scores from cached models) and 503 for the rest. The pool discards the client.
    pool.on("error", (err) => console.error(`bellwether: an idle database connection was lost (${err.message})`));
    // Likewise a connection lost while checked out (mid-query): the query fails, and its 'error'
    // event, which pg also emits on the client, must not go unheard.
    pool.on("connect", (client) => client.on("error", () => undefined));
    globalForDb.bellwetherPool = pool;
    globalForDb.bellwetherDb = drizzle(globalForDb.bellwetherPool, { schema });
  }
  return globalForDb.bellwetherDb;
}

/** Closes the pool (scripts and tests call this before exiting). */
export async function closeDb(): Promise<void> {
  const pool = globalForDb.bellwetherPool;
  globalForDb.bellwetherPool = undefined;
  globalForDb.bellwetherDb = undefined;
  await pool?.end();
}

/**
 * Runs `work` in one transaction on one connection of the pool, handing it a Drizzle executor and
 * the connection itself for what Drizzle cannot do (COPY … FROM STDIN with pg-copy-streams). It
 * commits when `work` resolves and rolls back when it throws; a connection that cannot even roll
 * back is discarded rather than returned to the pool.
 */
export async function transactionWithClient<T>(
  database: Database,
  work: (tx: Executor, client: PoolClient) => Promise<T>,
): Promise<T> {
  const client = await database.$client.connect();
  let broken: Error | undefined;
  try {
    await client.query("BEGIN").catch((err: Error) => {
      broken = err;
      throw err;
    });
    try {
      const result = await work(drizzle(client, { schema }), client);
      await client.query("COMMIT");
      return result;
    } catch (err) {
      await client.query("ROLLBACK").catch((rollbackError: Error) => {
        broken = rollbackError;
      });
      throw err;
    }
  } finally {
    client.release(broken);
  }
}
