import fs from "node:fs";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { readMigrationFiles } from "drizzle-orm/migrator";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { Client } from "pg";
import { sealAuditChain } from "./audit-chain";

const MIGRATIONS_FOLDER = path.join(process.cwd(), "drizzle");
const GRANTS_FILE = path.join(process.cwd(), "db", "grants.sql");

/** The role the app connects as; db/grants.sql grants to this name. */
export const APP_ROLE = "bellwether_app";

/**
 * Applies every migration in drizzle/ that the database has not seen yet, then db/grants.sql,
 * both as the owner of the schema (BELLWETHER_MIGRATION_URL, or the private cluster's owner);
 * then seals the audit events still queued for the hash chain (db/audit-chain.ts).
 */
export async function migrateDatabase(ownerUrl: string): Promise<void> {
  const client = new Client({ connectionString: ownerUrl });
  await client.connect();
  try {
    // Keep PostgreSQL's NOTICE lines (e.g. "schema already exists") out of the console.
    client.on("notice", () => undefined);
    await migrate(drizzle(client), { migrationsFolder: MIGRATIONS_FOLDER });
    await applyGrants(client);
    // Events queued by migration 0013 (a trail from before the chain) or left queued while no
    // app ran are linked now, before anything serves.
    await sealAuditChain(client);
  } finally {
    await client.end();
  }
}

/** Applies db/grants.sql in one transaction (also after a restore, since a dump carries no roles or grants). */
export async function applyGrants(client: Client): Promise<void> {
  const grants = fs.readFileSync(GRANTS_FILE, "utf8");
  try {
    await client.query("BEGIN");
    await client.query(grants);
    await client.query("COMMIT");
  } catch (err) {
    await client.query("ROLLBACK").catch(() => undefined);
    // undefined_object: the role named in the GRANTs is missing on this server.
    if ((err as { code?: string }).code === "42704" && String((err as Error).message).includes(APP_ROLE)) {
      throw new Error(`the role ${APP_ROLE} does not exist on this PostgreSQL; create it first (README, "Database roles")`);
    }
    throw err;
  }
}

/**
 * Checks, as the app's role, that every migration in drizzle/ has been applied. The app's role
 * cannot read drizzle's bookkeeping; db/grants.sql gives it bellwether_schema_version() instead.
 * Throws a message naming BELLWETHER_MIGRATION_URL when the schema is missing or behind.
 */
export async function assertSchemaCurrent(appUrl: string): Promise<void> {
  const client = new Client({ connectionString: appUrl });
  await client.connect();
  let applied: number | null;
  try {
    const { rows } = await client.query<{ version: string | null }>("SELECT public.bellwether_schema_version() AS version");
    applied = rows[0].version === null ? null : Number(rows[0].version);
  } catch (err) {
    const code = (err as { code?: string }).code;
    // undefined_function or insufficient_privilege: the migrations and grants never ran here for this role.
    if (code !== "42883" && code !== "42501") throw err;
    applied = null;
  } finally {
    await client.end();
  }
  const remedy =
    "Bellwether changes the schema only as its owner: set BELLWETHER_MIGRATION_URL to a connection string for the role that owns " +
    `the database (README, "Database roles") and start again; it applies the migrations and db/grants.sql, then connects as DATABASE_URL.`;
  if (applied === null) {
    throw new Error(`the database in DATABASE_URL has not been prepared for Bellwether (no migrations and grants applied for this role). ${remedy}`);
  }
  // Drizzle's migrator stamps each applied migration with its journal time and applies those newer
  // than the newest stamp; the same comparison says what it would apply.
  const migrations = readMigrationFiles({ migrationsFolder: MIGRATIONS_FOLDER });
  const pending = migrations.filter((m) => m.folderMillis > applied).length;
  if (pending > 0) {
    throw new Error(`the database in DATABASE_URL is ${pending} of ${migrations.length} migrations behind this version of Bellwether. ${remedy}`);
  }
}
