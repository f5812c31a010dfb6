/**
 * The pieces `npm start` and `npm test` share: the database (private cluster or DATABASE_URL),
 * migrations, the demo seed, the production build (rebuilt only when sources change) and the
 * served app.
 */
import { spawn, type ChildProcess } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { ensureCluster, ensureDatabase, startServer, stopServer, type LocalServer } from "../../db/local-server";
import { assertSchemaCurrent, migrateDatabase } from "../../db/migrate";
import * as schema from "../../db/schema";
import { seedDemo, type SeedDemoOptions } from "../../db/seed";
import { parseDemoLisEnv, parseEnv } from "../../lib/env";
import { startFakeMailProvider, type FakeMailProvider } from "../../lib/mail/fake-server";

export const ROOT = path.resolve(__dirname, "..", "..");

export interface DatabaseHandle {
  /** The app's role: what the app and the tests connect as. */
  url: string;
  /** The owner of the schema, for migrations; null when only DATABASE_URL was given. */
  migrationUrl: string | null;
  server: LocalServer | null;
  /** Whether the private cluster was started now or found running from an earlier start. */
  clusterStart: "started" | "taken over" | null;
}

/**
 * Starts (creating on first use) the private cluster with its two roles, or uses DATABASE_URL
 * (the app's role) and BELLWETHER_MIGRATION_URL (the owner) when they are given.
 */
export async function prepareDatabase(opts: {
  dataRoot: string;
  pgPort: number;
  database: string;
  external?: { url: string; migrationUrl?: string };
  fresh?: boolean;
}): Promise<DatabaseHandle> {
  if (opts.external) return { url: opts.external.url, migrationUrl: opts.external.migrationUrl ?? null, server: null, clusterStart: null };
  const server = ensureCluster(path.join(opts.dataRoot, "postgres"), opts.pgPort);
  try {
    // Inside the try: a start that fails half-way may still have left a postmaster running.
    const clusterStart = startServer(server);
    const { appUrl, ownerUrl } = await ensureDatabase(server, opts.database, opts.fresh);
    return { url: appUrl, migrationUrl: ownerUrl, server, clusterStart };
  } catch (err) {
    stopServer(server);
    throw err;
  }
}

/**
 * Brings the schema up to date as its owner (migrations, then db/grants.sql) when the owner's
 * connection is known; then checks, as the app's role, that nothing is pending. Without the
 * owner's connection nothing is changed: a schema that is behind stops the start with a message
 * naming BELLWETHER_MIGRATION_URL.
 */
export async function prepareSchema(database: DatabaseHandle): Promise<void> {
  if (database.migrationUrl) await migrateDatabase(database.migrationUrl);
  await assertSchemaCurrent(database.url);
}

/**
 * Seeds the demo laboratory, as the app's role: all of it into a database without users, what is
 * missing into one that holds the demo's accounts (db/seed.ts). `seconds` is how long it took.
 */
export async function seedDemoIfEmpty(
  url: string,
  options: SeedDemoOptions = { lis: parseDemoLisEnv(process.env) },
): Promise<{ seeded: boolean; seconds: number }> {
  const pool = new Pool({ connectionString: url, max: 2 });
  const started = performance.now();
  try {
    const seeded = await seedDemo(drizzle(pool, { schema }), options);
    return { seeded, seconds: (performance.now() - started) / 1000 };
  } finally {
    await pool.end();
  }
}

/** The session-signing secret: from the environment, or made once and kept in the data folder. */
export function ensureSecret(dataRoot: string): string {
  if (process.env.NEXTAUTH_SECRET) return process.env.NEXTAUTH_SECRET;
  const file = path.join(dataRoot, "nextauth-secret");
  if (!fs.existsSync(file)) {
    fs.mkdirSync(dataRoot, { recursive: true });
    fs.writeFileSync(file, crypto.randomBytes(32).toString("base64url"), { mode: 0o600 });
  }
  return fs.readFileSync(file, "utf8").trim();
}

const BUILD_INPUTS = [
  "app",
  "components",
  "lib",
  "db",
  "public",
  "types",
  "proxy.ts",
  "next.config.mjs",
  "tailwind.config.ts",
  "postcss.config.mjs",
  "tsconfig.json",
  "tsconfig.build.json",
  "instrumentation.ts",
  "instrumentation-node.ts",
  "package-lock.json",
];

function fingerprint(): string {
  const hash = crypto.createHash("sha256");
  const visit = (rel: string) => {
    const abs = path.join(ROOT, rel);
    if (!fs.existsSync(abs)) return;
    const stat = fs.statSync(abs);
    if (stat.isDirectory()) {
      for (const name of fs.readdirSync(abs).sort()) visit(path.join(rel, name));
    } else if (stat.isFile()) {
      hash.update(rel).update("\0").update(fs.readFileSync(abs)).update("\0");
    }
  };
  BUILD_INPUTS.forEach(visit);
  return hash.digest("hex");
}

/** Runs `next build` unless the last build was made from the same sources; `signal` stops it. */
export async function buildIfNeeded(signal?: AbortSignal): Promise<void> {
  const stampFile = path.join(ROOT, ".next", "bellwether-sources");
  const current = fingerprint();
  const built = fs.existsSync(path.join(ROOT, ".next", "BUILD_ID")) && fs.existsSync(stampFile)
    ? fs.readFileSync(stampFile, "utf8")
    : "";
  if (built === current) return;
  console.log("bellwether: building the app (next build)…");
  // Asynchronous, so that a signal arriving during the build is handled at once.
  const child = spawn(path.join(ROOT, "node_modules", ".bin", "next"), ["build"], {
    cwd: ROOT,
    stdio: ["ignore", "pipe", "pipe"],
    env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" },
    signal,
  });
  let output = "";
  child.stdout.on("data", (d) => (output += d));
  child.stderr.on("data", (d) => (output += d));
  const status = await new Promise<number | null>((resolve) => {
    child.on("error", () => undefined);
    child.on("close", (code) => resolve(code));
  });
  if (signal?.aborted) throw new Error("the build was stopped");
  if (status !== 0) {
    process.stderr.write(output);
    throw new Error("next build failed");
  }
  fs.writeFileSync(stampFile, current);
}

/**
 * Serves the built app on 127.0.0.1 and resolves once it answers its health check. With
 * `logFile` (and `quiet`), everything the server writes to stdout and stderr is appended there too.
 */
export async function serveApp(opts: { port: number; env: NodeJS.ProcessEnv; quiet?: boolean; logFile?: string }): Promise<ChildProcess> {
  // The server checks this too (instrumentation.ts); checking first gives the message at once.
  parseEnv(opts.env);
  // Bellwether's own server around Next (scripts/serve.ts): it resolves each client's address.
  // tsx loaded into node itself, not the tsx command: that one runs the script in a second
  // process of its own, so a signal or a crash of either would leave the other behind.
  const child = spawn(
    process.execPath,
    ["--import", "tsx", path.join(ROOT, "scripts", "serve.ts"), "--port", String(opts.port)],
    { cwd: ROOT, env: opts.env, stdio: opts.quiet ? ["ignore", "pipe", "pipe"] : "inherit" },
  );
  let log = "";
  child.stdout?.on("data", (d) => (log += d));
  child.stderr?.on("data", (d) => (log += d));
  if (opts.logFile && opts.quiet) {
    fs.mkdirSync(path.dirname(opts.logFile), { recursive: true });
    const file = fs.createWriteStream(opts.logFile, { flags: "a" });
    child.stdout?.pipe(file);
    child.stderr?.pipe(file);
  }
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    if (hasExited(child)) throw new Error(`the app exited during start-up:\n${log}`);
    try {
      const res = await fetch(`http://127.0.0.1:${opts.port}/api/health`);
      if (res.ok) return child;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 250));
  }
  child.kill("SIGTERM");
  throw new Error(`the app did not answer on port ${opts.port} within 60 s:\n${log}`);
}

/**
 * Whether a child has ended. One killed by a signal has `exitCode` null and `signalCode` set; both
 * are set before its `exit` event, which has then already been emitted.
 */
export function hasExited(child: ChildProcess): boolean {
  return child.exitCode !== null || child.signalCode !== null;
}

/** Stops the app: SIGTERM, then SIGKILL after 10 s; resolves once it has exited, however it ended. */
export function stopApp(child: ChildProcess | null): Promise<void> {
  if (!child || hasExited(child)) return Promise.resolve();
  return new Promise((resolve) => {
    const timer = setTimeout(() => child.kill("SIGKILL"), 10_000);
    child.once("exit", () => {
      clearTimeout(timer);
      resolve();
    });
    child.kill("SIGTERM");
  });
}

/** The file where the local fake provider keeps the messages it accepted (JSON lines). */
export function fakeMailFile(dataRoot: string): string {
  return path.join(dataRoot, "mail", "messages.jsonl");
}

/**
 * Where the app sends e-mail. With RESEND_BASE_URL, or RESEND_API_KEY alone (the real provider),
 * the environment decides and nothing is started; otherwise the local fake of the provider's API
 * starts on a free loopback port, keeping messages in `dataRoot`/mail/messages.jsonl, and the app
 * is pointed at it with a dummy key.
 */
export async function prepareMail(
  dataRoot: string,
  source: Record<string, string | undefined> = process.env,
): Promise<{ env: Record<string, string>; fake: FakeMailProvider | null }> {
  if (source.RESEND_BASE_URL || source.RESEND_API_KEY) return { env: {}, fake: null };
  const fake = await startFakeMailProvider({ file: fakeMailFile(dataRoot) });
  return { env: { RESEND_BASE_URL: fake.url, RESEND_API_KEY: "re_local_fake_provider" }, fake };
}
