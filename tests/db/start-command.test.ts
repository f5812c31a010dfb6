import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { migrateDatabase } from "@/db/migrate";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { changePassword, findUserByEmail } from "@/db/queries/users";
import * as schema from "@/db/schema";
import { seedDemo } from "@/db/seed";
import { verifyPassword } from "@/lib/auth/password";
import { createScratchDatabase, queryRows, SUPERUSER_URL, type ScratchDatabase } from "../support/scratch-database";
import { runStartCommand, SPARE_PORT, stopLeftoverStartCommands, TEST_DATA_DIR } from "../support/start-command";

// The demo accounts and passwords as the README publishes them.
const PUBLISHED = [
  { email: "admin@harrowmere.example", password: "bellwether-admin-demo" },
  { email: "director@harrowmere.example", password: "bellwether-director-demo" },
  { email: "scientist@harrowmere.example", password: "bellwether-scientist-demo" },
  { email: "clinician@harrowmere.example", password: "bellwether-clinician-demo" },
];

const scratch: ScratchDatabase[] = [];
const servers: ChildProcess[] = [];
afterEach(async () => {
  await stopLeftoverStartCommands();
  // A server that did not refuse as it should is still running.
  for (const server of servers.splice(0)) if (server.exitCode === null && server.signalCode === null) server.kill("SIGKILL");
});
afterAll(async () => {
  for (const s of scratch) await s.drop();
});

async function scratchDatabase(tag: string): Promise<ScratchDatabase> {
  const s = await createScratchDatabase(tag);
  scratch.push(s);
  return s;
}

function start(vars: Record<string, string>) {
  return runStartCommand({
    PORT: String(SPARE_PORT),
    BELLWETHER_DATA_DIR: path.join(TEST_DATA_DIR, "start-command"),
    NEXTAUTH_SECRET: "start-command-test-secret-at-least-32-characters",
    ...vars,
  });
}

/** Runs the start command until it serves, then stops it with SIGINT as Ctrl-C would. */
async function startAndStop(vars: Record<string, string>): Promise<string> {
  const run = start(vars);
  await run.waitFor("bellwether: serving on");
  run.child.kill("SIGINT");
  expect(await run.exited).toEqual({ code: 0, signal: null });
  return run.output();
}

/** Runs the start command expecting it to refuse: exit code 1 before serving. */
async function refusal(vars: Record<string, string>): Promise<string> {
  const run = start(vars);
  expect(await run.exited).toEqual({ code: 1, signal: null });
  expect(run.output()).not.toContain("serving on");
  return run.output();
}

// Needs the cluster's superuser for scratch databases: skipped against an external test database.
describe.skipIf(!SUPERUSER_URL)("the start command with DATABASE_URL (a real installation's database)", () => {
  it("migrates as BELLWETHER_MIGRATION_URL and seeds nothing without BELLWETHER_DEMO=1", async () => {
    const db = await scratchDatabase("plain");
    const output = await startAndStop({ DATABASE_URL: db.appUrl, BELLWETHER_MIGRATION_URL: db.ownerUrl });
    expect(output).toContain("bellwether: database ready (not a demo: nothing seeded)");
    expect(await queryRows(db.appUrl, "SELECT count(*)::int AS n FROM users")).toEqual([{ n: 0 }]);
    expect(await queryRows(db.appUrl, "SELECT count(*)::int AS n FROM audit_events")).toEqual([{ n: 0 }]);
  });

  it("seeds the demo with BELLWETHER_DEMO=1, with the passwords the README publishes", async () => {
    const db = await scratchDatabase("demo");
    const output = await startAndStop({ DATABASE_URL: db.appUrl, BELLWETHER_MIGRATION_URL: db.ownerUrl, BELLWETHER_DEMO: "1" });
    expect(output).toContain("bellwether: seeded the demo laboratory");
    const users = await queryRows<{ email: string; password_hash: string }>(db.appUrl, "SELECT email, password_hash FROM users ORDER BY email");
    expect(users.map((u) => u.email)).toEqual(PUBLISHED.map((p) => p.email).sort());
    for (const p of PUBLISHED) {
      expect(await verifyPassword(p.password, users.find((u) => u.email === p.email)!.password_hash), p.email).toBe(true);
    }
    // As below: the seed's password-checked signatures need more than the default 30 s under load.
  }, 120_000);

  it("refuses to serve while a demo account keeps its published password, also when the server is started by other means", async () => {
    const db = await scratchDatabase("published");
    await migrateDatabase(db.ownerUrl);
    const pool = new Pool({ connectionString: db.appUrl, max: 1 });
    const database = drizzle(pool, { schema });
    await seedDemo(database);

    const all = await refusal({ DATABASE_URL: db.appUrl, BELLWETHER_MIGRATION_URL: db.ownerUrl });
    expect(all).toContain(
      "bellwether: refusing to serve: these accounts still have the demo passwords published in the README: " +
        "admin@harrowmere.example, clinician@harrowmere.example, director@harrowmere.example, scientist@harrowmere.example.",
    );
    expect(all).toContain("Start once with BELLWETHER_DEMO=1, sign in and give each a new password");

    // Three accounts get passwords of their own; the fourth is still refused, alone.
    for (const email of ["admin@harrowmere.example", "director@harrowmere.example", "scientist@harrowmere.example"]) {
      const user = await findUserByEmail(database, { email });
      await changePassword(database, { id: user!.id, password: `${email}-own-password`, actor: SYSTEM_ACTOR });
    }
    await pool.end();
    const one = await refusal({ DATABASE_URL: db.appUrl, BELLWETHER_MIGRATION_URL: db.ownerUrl });
    expect(one).toContain("published in the README: clinician@harrowmere.example. Anyone could sign in with them.");

    // The server checks again when it starts, however it is started.
    const server = spawn(path.join("node_modules", ".bin", "next"), ["start", "-H", "127.0.0.1", "-p", String(SPARE_PORT)], {
      env: { PATH: process.env.PATH, NODE_ENV: "production", DATABASE_URL: db.appUrl, NEXTAUTH_SECRET: "s".repeat(32) },
      stdio: ["ignore", "pipe", "pipe"],
    });
    servers.push(server);
    let log = "";
    server.stdout.on("data", (d) => (log += d));
    server.stderr.on("data", (d) => (log += d));
    const code = await new Promise((resolve) => server.on("close", resolve));
    expect(code).toBe(1);
    expect(log).toContain("bellwether: refusing to serve: these accounts still have the demo passwords published in the README: clinician@harrowmere.example.");
    // The demo seed signs its nine versions in force, each after a bcrypt check of the director's
    // password: on a loaded 2-core machine the whole test takes longer than the default 30 s.
  }, 120_000);

  it("without BELLWETHER_MIGRATION_URL changes nothing and names it when the schema is not there", async () => {
    const db = await scratchDatabase("unmigrated");
    const output = await refusal({ DATABASE_URL: db.appUrl });
    expect(output).toContain("the database in DATABASE_URL has not been prepared for Bellwether");
    expect(output).toContain("set BELLWETHER_MIGRATION_URL to a connection string for the role that owns the database");
    expect(await queryRows(db.superuserUrl, "SELECT nspname FROM pg_namespace WHERE nspname IN ('public', 'drizzle') ORDER BY 1")).toEqual([
      { nspname: "public" },
    ]);
    expect(await queryRows(db.superuserUrl, "SELECT count(*)::int AS n FROM pg_tables WHERE schemaname = 'public'")).toEqual([{ n: 0 }]);
  });

  it("refuses to serve as the owner of the tables", async () => {
    const db = await scratchDatabase("owner");
    await migrateDatabase(db.ownerUrl);
    const output = await refusal({ DATABASE_URL: db.ownerUrl });
    // The owned tables are listed by name in alphabetical order; the audit trail is among them.
    expect(output).toMatch(
      /bellwether: refusing to serve: DATABASE_URL connects as "bellwether_owner", which owns \(or is a member of the owner of\) [a-z_, ]*\baudit_events\b/,
    );
  });
});
