import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { migrateDatabase } from "@/db/migrate";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { changeUserRole, createUser } from "@/db/queries/users";
import { admitSignInAttempt, settleSuccessfulSignIn } from "@/db/queries/sign-in-throttle";
import { auditEvents, users } from "@/db/schema";
import { testDatabase, uniqueEmail } from "../support/database";
import { appUrl, createScratchDatabase, pgError, queryRows, SUPERUSER_URL, type ScratchDatabase } from "../support/scratch-database";

const { database, pool } = testDatabase();
const scratch: ScratchDatabase[] = [];
afterAll(async () => {
  await pool.end();
  for (const s of scratch) await s.drop();
});

const testDatabaseName = () => new URL(appUrl()).pathname.slice(1);

/** The privileges the app's role holds on each table of the schema public, e.g. "SELECT, INSERT". */
async function tablePrivileges(url: string): Promise<Record<string, string>> {
  const rows = await queryRows<{ table_name: string; privileges: string }>(
    url,
    `SELECT c.relname AS table_name,
            array_to_string(ARRAY(SELECT p FROM unnest(ARRAY['SELECT', 'INSERT', 'UPDATE', 'DELETE', 'TRUNCATE', 'REFERENCES', 'TRIGGER']) AS p
                                  WHERE has_table_privilege(c.oid, p)), ', ') AS privileges
       FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
      WHERE n.nspname = 'public' AND c.relkind = 'r' ORDER BY 1`,
  );
  return Object.fromEntries(rows.map((r) => [r.table_name, r.privileges]));
}

describe("the app connects as a role with only the privileges it needs", () => {
  it("is neither a superuser nor the owner of anything", async () => {
    const [me] = await queryRows<{ role: string; rolsuper: boolean; owned: number }>(
      appUrl(),
      `SELECT current_user AS role, rolsuper,
              (SELECT count(*)::int FROM pg_class WHERE pg_has_role(current_user, relowner, 'USAGE')) AS owned
         FROM pg_roles WHERE rolname = current_user`,
    );
    expect(me).toEqual({ role: "bellwether_app", rolsuper: false, owned: 0 });
  });

  it("may not define anything: no CREATE on the schema, no new schemas, no temporary tables", async () => {
    expect(await pgError(appUrl(), "CREATE TABLE app_made (id int)")).toEqual({ code: "42501", message: "permission denied for schema public" });
    expect(await pgError(appUrl(), "CREATE SCHEMA app_made")).toEqual({ code: "42501", message: `permission denied for database ${testDatabaseName()}` });
    expect(await pgError(appUrl(), "CREATE TEMPORARY TABLE app_made (id int)")).toEqual({
      code: "42501",
      message: `permission denied to create temporary tables in database "${testDatabaseName()}"`,
    });
    expect(await pgError(appUrl(), "DROP TABLE sign_in_account_failures")).toEqual({ code: "42501", message: "must be owner of table sign_in_account_failures" });
  });

  it("may not empty tables, move sequences or read the migration bookkeeping", async () => {
    expect(await pgError(appUrl(), "TRUNCATE sign_in_account_failures")).toEqual({ code: "42501", message: "permission denied for table sign_in_account_failures" });
    expect(await pgError(appUrl(), "SELECT setval('audit_events_id_seq', 1)")).toEqual({
      code: "42501",
      message: "permission denied for sequence audit_events_id_seq",
    });
    expect(await pgError(appUrl(), "SELECT * FROM drizzle.__drizzle_migrations")).toEqual({ code: "42501", message: "permission denied for schema drizzle" });
  });

  it("holds exactly: read and add on the audit trail; read, add, change, remove on the other tables", async () => {
    const privileges = await tablePrivileges(appUrl());
    // The requirement written out: audit_events, the audit chain's links (audit_chain) and
    // signatures SELECT and INSERT only; every other domain table SELECT, INSERT, UPDATE, DELETE; never TRUNCATE, REFERENCES, TRIGGER.
    expect(privileges.audit_events).toBe("SELECT, INSERT");
    for (const [table, granted] of Object.entries(privileges)) {
      if (table === "audit_events" || table === "audit_chain" || table === "signatures") expect(granted, table).toBe("SELECT, INSERT");
      else expect(granted, table).toBe("SELECT, INSERT, UPDATE, DELETE");
    }
    expect(Object.keys(privileges)).toEqual(expect.arrayContaining(["analytes", "audit_events", "laboratory", "sign_in_account_failures", "sign_in_address_failures", "users"]));
  });

  it("still does the app's normal writes, in transactions, with audit events", async () => {
    const email = uniqueEmail("app-role");
    const user = await createUser(database, { input: { email, name: "Role Check", role: "clinician", password: "r".repeat(14) }, actor: SYSTEM_ACTOR });
    await changeUserRole(database, { id: user.id, role: "scientist", actor: SYSTEM_ACTOR });
    const [stored] = await database.select().from(users).where(eq(users.id, user.id));
    expect(stored.role).toBe("scientist");
    const actions = (await database.select().from(auditEvents).where(eq(auditEvents.entityId, user.id))).map((e) => e.action);
    expect(actions).toEqual(["user.created", "user.role_changed"]);
    // Insert-or-update and delete on a table the app owns the rows of.
    // (the sign-in throttle: insert, select for update, update, then delete its rows)
    const attempt = { email, address: "192.0.2.44", bucket: "192.0.2.44" };
    const policy = { freeFailures: 3, firstDelaySeconds: 30, maxDelaySeconds: 900, addressMaxFailures: 30, windowSeconds: 3600 };
    expect(await admitSignInAttempt(database, { attempt, policy })).toMatchObject({ admitted: true });
    await database.transaction((tx) => settleSuccessfulSignIn(tx, { attempt, policy }));
  });
});

// Needs the cluster's superuser for a scratch database: skipped against an external test database.
describe.skipIf(!SUPERUSER_URL)("db/grants.sql is applied after every migration run", () => {
  it("covers a table added later, by the append-only rule when its name is on the list", async () => {
    const s = await createScratchDatabase("grants");
    scratch.push(s);
    await migrateDatabase(s.ownerUrl);
    // As a later migration would, as the owner: one ordinary table, and the signatures table.
    await queryRows(s.ownerUrl, "CREATE TABLE later_domain_table (id int); CREATE TABLE IF NOT EXISTS signatures (id int)");
    expect((await tablePrivileges(s.appUrl)).later_domain_table).toBe("");
    await migrateDatabase(s.ownerUrl);
    const privileges = await tablePrivileges(s.appUrl);
    expect(privileges.later_domain_table).toBe("SELECT, INSERT, UPDATE, DELETE");
    expect(privileges.signatures).toBe("SELECT, INSERT");
    expect(privileges.audit_events).toBe("SELECT, INSERT");
    expect(privileges.audit_chain).toBe("SELECT, INSERT");
  });
});
