/**
 * npm start (after scripts/ensure-system.sh): the private PostgreSQL (or DATABASE_URL), migrations
 * as the schema's owner, the demo seed in demo mode, the checks before serving, a build when
 * sources changed, and the app on http://127.0.0.1:PORT.
 *
 * Stopping: however the command ends (Ctrl-C, SIGTERM, SIGHUP when the terminal closes, the app
 * exiting, an error during start-up), one stop runs: it lets the start-up step in progress end
 * (a build is killed), stops the app, the local fake mail provider, then the private cluster, then exits. scripts/start.sh
 * `exec`s node with tsx loaded in-process, so signals reach this process itself.
 */
import fs from "node:fs";
import path from "node:path";
import type { ChildProcess } from "node:child_process";
import type { FakeMailProvider } from "../lib/mail/fake-server";
import { stopServer } from "../db/local-server";
import { assertSafeToServe } from "../db/preflight";
import { demoMode, parseStartEnv } from "../lib/env";
import {
  buildIfNeeded,
  ensureSecret,
  fakeMailFile,
  hasExited,
  prepareDatabase,
  prepareMail,
  prepareSchema,
  ROOT,
  seedDemoIfEmpty,
  serveApp,
  stopApp,
  type DatabaseHandle,
} from "./lib/app-stack";
import { onShutdown, say } from "./lib/shutdown";

let database: DatabaseHandle | null = null;
let app: ChildProcess | null = null;
let mailFake: FakeMailProvider | null = null;
let releaseDataFolder = () => {};
const lifetime = new AbortController();
let startup: Promise<void> = Promise.resolve();

const exit = onShutdown(
  async (reason) => {
    lifetime.abort();
    if (reason !== "start-up failed") say(`bellwether: stopping (${reason})`);
    await startup;
    await stopApp(app);
    await mailFake?.close();
    if (database?.server) {
      stopServer(database.server);
      say("bellwether: stopped the private PostgreSQL");
    }
    releaseDataFolder();
  },
  // Ctrl-C, SIGTERM and a closed terminal are requests to stop, not failures.
  { signalExitCode: () => 0 },
);

/**
 * Marks the data folder as used by this process. A mark left by a start that is still running
 * stops this one (both would use one cluster, and the first to end would stop it under the
 * other); a mark left by one that died is taken over.
 */
function claimDataFolder(dataRoot: string): () => void {
  const file = path.join(dataRoot, "start.pid");
  const holder = fs.existsSync(file) ? Number(fs.readFileSync(file, "utf8").trim()) : NaN;
  if (Number.isInteger(holder) && holder !== process.pid && isStartCommand(holder)) {
    throw new Error(`another \`npm start\` (pid ${holder}) is using ${path.relative(ROOT, dataRoot) || dataRoot}; stop it first`);
  }
  fs.mkdirSync(dataRoot, { recursive: true });
  fs.writeFileSync(file, String(process.pid));
  return () => {
    if (fs.existsSync(file) && fs.readFileSync(file, "utf8").trim() === String(process.pid)) fs.rmSync(file);
  };
}

function isStartCommand(pid: number): boolean {
  try {
    return fs.readFileSync(`/proc/${pid}/cmdline`, "utf8").includes("scripts/start.ts");
  } catch {
    return false;
  }
}

/** A signal, the default of `next start` (130, 143) or a clean exit: the app was asked to stop. */
function stoppedOnRequest(code: number | null, signal: NodeJS.Signals | null): boolean {
  return code === 0 || code === 130 || code === 143 || signal === "SIGINT" || signal === "SIGTERM" || signal === "SIGHUP";
}

async function start(): Promise<void> {
  const settings = parseStartEnv(process.env);
  const dataRoot = path.resolve(ROOT, settings.BELLWETHER_DATA_DIR);
  const demo = demoMode(settings);
  const step = () => lifetime.signal.throwIfAborted();

  if (!settings.DATABASE_URL) releaseDataFolder = claimDataFolder(dataRoot);
  database = await prepareDatabase({
    dataRoot,
    pgPort: settings.BELLWETHER_PG_PORT,
    database: "bellwether",
    external: settings.DATABASE_URL ? { url: settings.DATABASE_URL, migrationUrl: settings.BELLWETHER_MIGRATION_URL } : undefined,
  });
  say(
    database.server
      ? `bellwether: private PostgreSQL on 127.0.0.1:${settings.BELLWETHER_PG_PORT} (data in ${path.relative(ROOT, database.server.dataDir) || database.server.dataDir})` +
          (database.clusterStart === "taken over" ? ", found running from an earlier start and taken over" : "")
      : `bellwether: using the database in DATABASE_URL${database.migrationUrl ? ", migrating it as BELLWETHER_MIGRATION_URL" : ""}`,
  );
  step();
  await prepareSchema(database);
  step();
  if (demo) {
    const { seeded, seconds } = await seedDemoIfEmpty(database.url);
    say(seeded ? `bellwether: seeded the demo laboratory (${seconds.toFixed(1)} s)` : "bellwether: database ready (existing data kept)");
  } else {
    say("bellwether: database ready (not a demo: nothing seeded)");
  }
  step();
  await assertSafeToServe(database.url, { demo });
  step();
  const secret = ensureSecret(dataRoot);
  await buildIfNeeded(lifetime.signal);
  step();
  const mail = await prepareMail(dataRoot);
  mailFake = mail.fake;
  say(
    mailFake
      ? `bellwether: e-mail goes to the local fake provider at ${mailFake.url} (messages kept in ${path.relative(ROOT, fakeMailFile(dataRoot))}; the outbox is at /admin/outbox)`
      : `bellwether: e-mail goes through Resend${process.env.RESEND_BASE_URL ? ` at ${process.env.RESEND_BASE_URL}` : ""}`,
  );
  step();
  const url = `http://127.0.0.1:${settings.PORT}`;
  const appEnv: NodeJS.ProcessEnv = {
    ...process.env,
    ...mail.env,
    NODE_ENV: "production",
    DATABASE_URL: database.url,
    BELLWETHER_DEMO: demo ? "1" : "0",
    NEXTAUTH_SECRET: secret,
    NEXTAUTH_URL: process.env.NEXTAUTH_URL ?? url,
  };
  // The app never needs the owner's password.
  delete appEnv.BELLWETHER_MIGRATION_URL;
  app = await serveApp({ port: settings.PORT, env: appEnv });
  step();
  const served = app;
  const onAppExit = () => {
    const requested = stoppedOnRequest(served.exitCode, served.signalCode);
    if (!requested) say(`bellwether: the app stopped unexpectedly (${served.signalCode ?? `exit code ${served.exitCode}`})`, process.stderr);
    void exit(requested ? 0 : 1, "the app stopped");
  };
  served.once("exit", onAppExit);
  if (hasExited(served)) onAppExit();
  say(`bellwether: serving on ${url} (Ctrl-C stops it)`);
}

startup = start().catch((err: unknown) => {
  if (!lifetime.signal.aborted) {
    say(`bellwether: ${err instanceof Error ? err.message : String(err)}`, process.stderr);
    void exit(1, "start-up failed");
  }
});
