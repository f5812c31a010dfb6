/**
 * The first administrator of a real installation (which has no demo accounts):
 *
 *   npm run -s create-admin -- --email it.lead@lab.example --name "Full Name"
 *
 * Creates an active administrator with a random one-time password, printed once; Bellwether asks
 * for a password of the person's own at the first sign-in. Refuses an e-mail that already has an
 * account. Uses DATABASE_URL when it is set, else the private PostgreSQL that `npm start` made
 * (starting it for the moment when it is not running). Exit 2 for wrong arguments, 1 otherwise.
 */
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { parseArgs } from "node:util";
import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { z } from "zod";
import { ensureCluster, ensureDatabase, isRunning, startServer, stopServer, type LocalServer } from "../db/local-server";
import { createUser } from "../db/queries/users";
import * as schema from "../db/schema";
import { AppError } from "../lib/api/errors";
import { ROOT } from "./lib/app-stack";

const USAGE = 'usage: npm run -s create-admin -- --email ADDRESS --name "FULL NAME"';

const argsSchema = z.object({
  email: z.email("--email must be an e-mail address").max(320),
  name: z.string("--name is required").trim().min(2, "--name must be the person's full name").max(120),
});

class UsageError extends Error {}

function readArgs(argv: string[]): z.output<typeof argsSchema> {
  let values: Record<string, unknown>;
  try {
    ({ values } = parseArgs({ args: argv, options: { email: { type: "string" }, name: { type: "string" } }, strict: true }));
  } catch (err) {
    throw new UsageError((err as Error).message);
  }
  const parsed = argsSchema.safeParse(values);
  if (!parsed.success) throw new UsageError(parsed.error.issues.map((i) => i.message).join("; "));
  return parsed.data;
}

/** The database `npm start` uses: DATABASE_URL, or the private cluster in the data folder. */
async function openDatabase(): Promise<{ url: string; started: LocalServer | null }> {
  if (process.env.DATABASE_URL) return { url: process.env.DATABASE_URL, started: null };
  const dataRoot = path.resolve(ROOT, process.env.BELLWETHER_DATA_DIR ?? ".data");
  const clusterDir = path.join(dataRoot, "postgres");
  if (!fs.existsSync(path.join(clusterDir, "PG_VERSION"))) {
    throw new Error(`there is no Bellwether database in ${dataRoot}: run \`npm start\` once first, or set DATABASE_URL`);
  }
  const server = ensureCluster(clusterDir, Number(process.env.BELLWETHER_PG_PORT ?? 54329));
  const wasRunning = isRunning(server);
  if (!wasRunning) startServer(server);
  // As the app's role, like every other write of accounts (ensureDatabase only makes sure the
  // roles exist and hands back their addresses).
  const { appUrl } = await ensureDatabase(server, "bellwether");
  return { url: appUrl, started: wasRunning ? null : server };
}

async function main(): Promise<number> {
  let args: z.output<typeof argsSchema>;
  try {
    args = readArgs(process.argv.slice(2));
  } catch (err) {
    if (!(err instanceof UsageError)) throw err;
    console.error(`create-admin: ${err.message}\n${USAGE}`);
    return 2;
  }
  const { url, started } = await openDatabase();
  const pool = new Pool({ connectionString: url, max: 1 });
  try {
    const password = crypto.randomBytes(18).toString("base64url");
    const user = await createUser(drizzle(pool, { schema }), {
      input: { email: args.email, name: args.name, role: "admin", password, mustChangePassword: true },
      actor: { id: null, label: "create-admin command" },
    });
    console.log(`Created the administrator ${user.name} <${user.email}>.`);
    console.log(`One-time password, shown only now: ${password}`);
    console.log("Sign in with it; Bellwether then asks for a password of your own before anything else.");
    return 0;
  } catch (err) {
    if (err instanceof AppError) {
      console.error(`create-admin: ${err.message} Nothing was changed.`);
      return 1;
    }
    // PostgreSQL's "undefined table": the migrations have not run against this database.
    if ((err as { cause?: { code?: string } }).cause?.code === "42P01") {
      console.error("create-admin: the database has no Bellwether tables yet: run `npm start` once first.");
      return 1;
    }
    throw err;
  } finally {
    await pool.end();
    if (started) stopServer(started);
  }
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(`create-admin: ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  },
);
