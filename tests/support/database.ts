import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import * as schema from "@/db/schema";
import type { Database } from "@/db/client";

/**
 * The test database that scripts/run-tests.ts created, migrated and seeded, connected as the app's
 * role (bellwether_app), as the app itself connects. Each test file opens its own pool and closes
 * it in afterAll.
 */
export function testDatabase(): { database: Database; pool: Pool } {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error("DATABASE_URL is not set: run the integration tests through `npm test`");
  const pool = new Pool({ connectionString: url, max: 4 });
  return { database: drizzle(pool, { schema }), pool };
}

export function uniqueEmail(tag: string): string {
  return `${tag}.${Date.now()}.${Math.floor(Math.random() * 1e6)}@integration.example`;
}
