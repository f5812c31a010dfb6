import { Client } from "pg";
import { afterAll, describe, expect, it } from "vitest";
import { assertSchemaCurrent, migrateDatabase } from "@/db/migrate";
import { assertSafeToServe } from "@/db/preflight";
import { appUrl, createScratchDatabase, ownerUrl, SUPERUSER_URL, type ScratchDatabase } from "../support/scratch-database";

const scratch: ScratchDatabase[] = [];
afterAll(async () => {
  for (const s of scratch) await s.drop();
});

async function failure(promise: Promise<unknown>): Promise<string> {
  return promise.then(
    () => "no error",
    (err: unknown) => (err instanceof Error ? err.message : String(err)),
  );
}

describe("the checks before serving", () => {
  it("accept the app's role on the demo database in demo mode", async () => {
    await expect(assertSafeToServe(appUrl(), { demo: true })).resolves.toBeUndefined();
  });

  it("refuse the owner of the tables", async () => {
    const message = await failure(assertSafeToServe(ownerUrl(), { demo: true }));
    expect(message).toMatch(/^refusing to serve: DATABASE_URL connects as "bellwether_owner", which owns \(or is a member of the owner of\) [a-z_, ]*audit_events/);
    expect(message).toContain("Connect as the app's own role (bellwether_app; README, \"Database roles\")");
  });

  it.skipIf(!SUPERUSER_URL)("refuse a superuser", async () => {
    const superuser = new URL(SUPERUSER_URL!);
    superuser.pathname = new URL(appUrl()).pathname;
    expect(await failure(assertSafeToServe(superuser.toString(), { demo: true }))).toBe(
      'refusing to serve: DATABASE_URL connects as "postgres", a PostgreSQL superuser, which could disable the triggers that keep the audit trail append-only. ' +
        "Connect as the app's own role (bellwether_app; README, \"Database roles\") and give the owner's connection to BELLWETHER_MIGRATION_URL.",
    );
  });

  it("refuse, outside demo mode, the demo accounts that keep their published passwords", async () => {
    // The test database is seeded with the demo, whose four passwords are unchanged.
    expect(await failure(assertSafeToServe(appUrl(), { demo: false }))).toContain(
      "these accounts still have the demo passwords published in the README: admin@harrowmere.example, clinician@harrowmere.example, director@harrowmere.example, scientist@harrowmere.example.",
    );
  });
});

describe("whether the schema is current, as the app's role sees it", () => {
  it("is current on the migrated test database", async () => {
    await expect(assertSchemaCurrent(appUrl())).resolves.toBeUndefined();
  });

  it.skipIf(!SUPERUSER_URL)("names the pending migrations and BELLWETHER_MIGRATION_URL when the database is behind", async () => {
    const db = await createScratchDatabase("behind");
    scratch.push(db);
    expect(await failure(assertSchemaCurrent(db.appUrl))).toContain("the database in DATABASE_URL has not been prepared for Bellwether");
    await migrateDatabase(db.ownerUrl);
    await expect(assertSchemaCurrent(db.appUrl)).resolves.toBeUndefined();
    // Forget the newest migration, as if this version added one the database has not seen.
    const owner = new Client({ connectionString: db.ownerUrl });
    await owner.connect();
    await owner.query("DELETE FROM drizzle.__drizzle_migrations WHERE created_at = (SELECT max(created_at) FROM drizzle.__drizzle_migrations)");
    await owner.end();
    const message = await failure(assertSchemaCurrent(db.appUrl));
    expect(message).toMatch(/^the database in DATABASE_URL is 1 of \d+ migrations behind this version of Bellwether\. /);
    expect(message).toContain("set BELLWETHER_MIGRATION_URL to a connection string for the role that owns the database");
  });
});
