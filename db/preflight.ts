/**
 * What must hold before Bellwether serves, checked by `npm start` and again by the server when it
 * starts (instrumentation.ts): the app's database role cannot undo what the database enforces (the
 * append-only audit trail), and a real installation carries none of the demo's published passwords.
 */
import { Client } from "pg";
import { verifyPassword } from "@/lib/auth/password";
import { APP_ROLE } from "./migrate";
import { DEMO_USERS } from "./demo-accounts";

const ROLES_SECTION = 'README, "Database roles"';

/** Throws one message listing why Bellwether must not serve with this connection, if anything. */
export async function assertSafeToServe(databaseUrl: string, { demo }: { demo: boolean }): Promise<void> {
  const client = new Client({ connectionString: databaseUrl });
  await client.connect();
  try {
    const problems = await roleProblems(client);
    if (problems.length === 0 && !demo) {
      const published = await accountsWithDemoPasswords(client);
      if (published.length > 0) {
        problems.push(
          `these accounts still have the demo passwords published in the README: ${published.join(", ")}. ` +
            "Anyone could sign in with them. Start once with BELLWETHER_DEMO=1, sign in and give each a new password " +
            "(an administrator can on Users, each person on Account), then start again without it; " +
            "or, if this is a demo, keep BELLWETHER_DEMO=1.",
        );
      }
    }
    if (problems.length > 0) throw new Error(`refusing to serve: ${problems.join("\n  ")}`);
  } finally {
    await client.end();
  }
}

async function roleProblems(client: Client): Promise<string[]> {
  const { rows } = await client.query<{
    role: string;
    superuser: boolean;
    createrole: boolean;
    owned: string | null;
    create_in_schema: boolean;
    create_schemas: boolean;
    app_privileges: boolean | null;
  }>(`
    SELECT current_user AS role, r.rolsuper AS superuser, r.rolcreaterole AS createrole,
      (SELECT string_agg(c.relname, ', ' ORDER BY c.relname)
         FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
        WHERE n.nspname = 'public' AND c.relkind IN ('r', 'p') AND pg_has_role(current_user, c.relowner, 'USAGE')) AS owned,
      has_schema_privilege('public', 'CREATE') AS create_in_schema,
      has_database_privilege(current_database(), 'CREATE') AS create_schemas,
      CASE WHEN to_regclass('public.users') IS NULL THEN NULL
           ELSE has_table_privilege('public.users', 'SELECT, INSERT, UPDATE, DELETE') END AS app_privileges
    FROM pg_roles r WHERE r.rolname = current_user`);
  const r = rows[0];
  const who = `DATABASE_URL connects as "${r.role}"`;
  const remedy = `Connect as the app's own role (${APP_ROLE}; ${ROLES_SECTION}) and give the owner's connection to BELLWETHER_MIGRATION_URL.`;
  if (r.superuser) {
    return [`${who}, a PostgreSQL superuser, which could disable the triggers that keep the audit trail append-only. ${remedy}`];
  }
  const problems: string[] = [];
  if (r.createrole) {
    problems.push(`${who}, a role that may create roles (CREATEROLE) and so could make itself a member of the tables' owner. ${remedy}`);
  }
  if (r.owned) {
    problems.push(`${who}, which owns (or is a member of the owner of) ${r.owned}; an owner can disable the audit trail's triggers. ${remedy}`);
  }
  if (r.create_in_schema || r.create_schemas) {
    problems.push(
      `${who}, which may create ${r.create_in_schema ? "objects in the schema public" : "schemas in the database"} (DDL). ` +
        "Run the migrations as the owner (BELLWETHER_MIGRATION_URL) so that db/grants.sql takes that away, or revoke it yourself.",
    );
  }
  if (r.app_privileges === false) {
    problems.push(`${who}, which lacks the app's privileges on the tables: connect as ${APP_ROLE}, or GRANT ${APP_ROLE} TO "${r.role}".`);
  }
  return problems;
}

/** E-mails of demo accounts whose password is still the one the README publishes. */
async function accountsWithDemoPasswords(client: Client): Promise<string[]> {
  const { rows } = await client.query<{ email: string; password_hash: string }>(
    "SELECT email, password_hash FROM users WHERE email = ANY($1) ORDER BY email",
    [DEMO_USERS.map((u) => u.email)],
  );
  const published: string[] = [];
  for (const row of rows) {
    const demoUser = DEMO_USERS.find((u) => u.email === row.email);
    if (demoUser && (await verifyPassword(demoUser.password, row.password_hash))) published.push(row.email);
  }
  return published;
}
