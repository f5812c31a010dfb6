import { spawnSync } from "node:child_process";
import path from "node:path";
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { findUserByEmail } from "@/db/queries/users";
import { auditEvents } from "@/db/schema";
import { testDatabase, uniqueEmail } from "../support/database";
import { BASE_URL, signInOverHttp } from "../support/http-session";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

const ROOT = path.resolve(__dirname, "..", "..");

/** `npm run -s create-admin -- ARGS`, against the test database. */
function createAdmin(args: string[]) {
  const result = spawnSync(
    path.join(ROOT, "node_modules", ".bin", "tsx"),
    ["--conditions=react-server", path.join(ROOT, "scripts", "create-admin.ts"), ...args],
    { cwd: ROOT, encoding: "utf8", env: { ...process.env, DATABASE_URL: process.env.DATABASE_URL } },
  );
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

describe("the create-admin command", () => {
  const email = uniqueEmail("first-admin");

  it("creates an active administrator with a one-time password printed once, to be changed at the first sign-in", async () => {
    const run = createAdmin(["--email", email, "--name", "Marit Oyelaran"]);
    expect(run.stderr).toBe("");
    expect(run.status).toBe(0);
    const lines = run.stdout.trim().split("\n");
    expect(lines[0]).toBe(`Created the administrator Marit Oyelaran <${email}>.`);
    const password = /^One-time password, shown only now: (\S+)$/.exec(lines[1])?.[1];
    expect(password).toBeDefined();
    expect(password!.length).toBeGreaterThanOrEqual(12);
    expect(lines[2]).toBe("Sign in with it; Bellwether then asks for a password of your own before anything else.");

    const stored = await findUserByEmail(database, { email });
    expect(stored).toMatchObject({ role: "admin", active: true, mustChangePassword: true, name: "Marit Oyelaran" });
    expect(stored!.passwordHash).not.toContain(password!);
    const events = await database.select().from(auditEvents).where(eq(auditEvents.entityId, stored!.id));
    expect(events.map((e) => [e.action, e.actorLabel])).toEqual([["user.created", "create-admin command"]]);

    const cookie = await signInOverHttp(email, password!);
    const res = await fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie } });
    expect(res.status).toBe(403);
    expect((await res.json()).detail).toBe(
      "An administrator set your password: choose your own before doing anything else. Sign in to Bellwether in a browser to change it.",
    );
  });

  it("refuses an e-mail that already has an account, in any case, and changes nothing", async () => {
    const before = await findUserByEmail(database, { email });
    const run = createAdmin(["--email", email.toUpperCase(), "--name", "Someone Else"]);
    expect(run.status).toBe(1);
    expect(run.stdout).toBe("");
    expect(run.stderr.trim()).toBe(`create-admin: A user with the e-mail ${email} already exists. Nothing was changed.`);
    expect(await findUserByEmail(database, { email })).toEqual(before);
  });

  it("explains its arguments when they are wrong", () => {
    const usage = 'usage: npm run -s create-admin -- --email ADDRESS --name "FULL NAME"';
    const missing = createAdmin(["--email", uniqueEmail("no-name")]);
    expect(missing.status).toBe(2);
    expect(missing.stderr.trim()).toBe(`create-admin: --name is required\n${usage}`);
    const bad = createAdmin(["--email", "not-an-address", "--name", "Marit Oyelaran"]);
    expect(bad.status).toBe(2);
    expect(bad.stderr.trim()).toBe(`create-admin: --email must be an e-mail address\n${usage}`);
  });
});
