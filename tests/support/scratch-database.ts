import crypto from "node:crypto";
import { Client } from "pg";

/** The test cluster's superuser (scripts/run-tests.ts passes it for its own cluster only). */
export const SUPERUSER_URL = process.env.BELLWETHER_TEST_SUPERUSER_URL;

function required(name: string): string {
  const value = process.env[name];
  if (!value) throw new Error(`${name} is not set: run the tests through \`npm test\``);
  return value;
}

/** The app's connection to the test database: what the app itself connects as. */
export const appUrl = () => required("DATABASE_URL");
/** The owner's connection to the test database, for the checks that need it. */
export const ownerUrl = () => required("BELLWETHER_MIGRATION_URL");

function withDatabase(url: string, database: string): string {
  const u = new URL(url);
  u.pathname = `/${database}`;
  return u.toString();
}

export interface ScratchDatabase {
  name: string;
  /** As the app's role (the roles and passwords of the test database). */
  appUrl: string;
  /** As the owner of the schema. */
  ownerUrl: string;
  /** As the cluster's superuser. */
  superuserUrl: string;
  drop(): Promise<void>;
}

async function asSuperuser(sql: string): Promise<void> {
  const client = new Client({ connectionString: SUPERUSER_URL });
  await client.connect();
  try {
    await client.query(sql);
  } finally {
    await client.end();
  }
}

/** An empty database owned by the owner role, without migrations: what a new installation has. */
export async function createScratchDatabase(tag: string): Promise<ScratchDatabase> {
  const superuser = required("BELLWETHER_TEST_SUPERUSER_URL");
  const name = `scratch_${tag}_${crypto.randomBytes(4).toString("hex")}`;
  const owner = new URL(ownerUrl()).username;
  await asSuperuser(`CREATE DATABASE "${name}" OWNER "${owner}"`);
  return {
    name,
    appUrl: withDatabase(appUrl(), name),
    ownerUrl: withDatabase(ownerUrl(), name),
    superuserUrl: withDatabase(superuser, name),
    drop: () => asSuperuser(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`),
  };
}

/** Runs one statement on a fresh connection and returns PostgreSQL's error, or null if it succeeded. */
export async function pgError(url: string, sql: string): Promise<{ code: string; message: string } | null> {
  const client = new Client({ connectionString: url });
  await client.connect();
  try {
    await client.query(sql);
    return null;
  } catch (err) {
    const e = err as { code?: string; message: string };
    return { code: e.code ?? "", message: e.message };
  } finally {
    await client.end();
  }
}

/** Runs one statement on its own connection and returns its rows. */
export async function queryRows<T>(url: string, sql: string): Promise<T[]> {
  const client = new Client({ connectionString: url });
  await client.connect();
  try {
    return (await client.query(sql)).rows as T[];
  } finally {
    await client.end();
  }
}
