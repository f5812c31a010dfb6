import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { env } from "@/lib/env";
import * as schema from "./schema";

export type Database = NodePgDatabase<typeof schema>;
/** A database handle or an open transaction: queries accept either. */
export type Executor = Database | Parameters<Parameters<Database["transaction"]>[0]>[0];

// One pool per process, kept across hot reloads in development.
const globalForDb = globalThis as unknown as { bellwetherPool?: Pool; bellwetherDb?: Database };

export function db(): Database {
  if (!globalForDb.bellwetherDb) {
    globalForDb.bellwetherPool = new Pool({ connectionString: env().DATABASE_URL, max: 10 });
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
