/**
 * npm test (after scripts/ensure-system.sh): unit tests, then a fresh private PostgreSQL and the
 * served app for the integration and browser tests. Stops what it started, also on failure and on
 * Ctrl-C, SIGTERM or SIGHUP, and ends with the line "N passed, N failed". The type check and the
 * linter count as one test each. `npm test -- unit` (or integration, e2e) runs one suite.
 */
import { spawn, type ChildProcess } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { stopClustersUnder, stopServer, superuserUrl } from "../db/local-server";
import type { FakeMailProvider } from "../lib/mail/fake-server";
import { buildIfNeeded, prepareDatabase, prepareMail, prepareSchema, ROOT, seedDemoIfEmpty, serveApp, stopApp, type DatabaseHandle } from "./lib/app-stack";
import { onShutdown, say } from "./lib/shutdown";

const SUITES = ["unit", "integration", "e2e"] as const;
type Suite = (typeof SUITES)[number];

interface Tally {
  passed: number;
  failed: number;
  skipped: number;
}

const dataRoot = path.resolve(ROOT, process.env.BELLWETHER_TEST_DATA_DIR ?? ".test-data");

let database: DatabaseHandle | null = null;
let app: ChildProcess | null = null;
let mailFake: FakeMailProvider | null = null;
/** The vitest, tsc or eslint run in progress. */
let running: ChildProcess | null = null;
const lifetime = new AbortController();
let finished: Promise<number> = Promise.resolve(0);

const exit = onShutdown(
  async (reason) => {
    lifetime.abort();
    if (reason !== "done") say(`bellwether: tests interrupted (${reason}); stopping what they started`, process.stderr);
    await stopApp(running);
    // The step in progress ends (once aborted, main starts nothing new); then what it started is stopped.
    await finished.catch(() => undefined);
    await stopApp(app);
    await mailFake?.close();
    if (database?.server) stopServer(database.server);
  },
  { signalExitCode: (signal) => 128 + os.constants.signals[signal] },
);

/** Runs a command to its end without blocking the event loop, so that a signal is handled at once. */
function run(bin: string, args: string[], env?: NodeJS.ProcessEnv): Promise<number | null> {
  lifetime.signal.throwIfAborted();
  const child = spawn(path.join(ROOT, "node_modules", ".bin", bin), args, { cwd: ROOT, stdio: "inherit", env: env ?? process.env });
  running = child;
  return new Promise((resolve) => {
    child.on("error", () => resolve(null));
    child.on("exit", (code) => {
      running = null;
      resolve(code);
    });
  });
}

/** Arguments after the suite names (test file paths or name filters) narrow what vitest runs. */
const vitestFilters = () => process.argv.slice(2).filter((a) => !(SUITES as readonly string[]).includes(a));

async function runVitest(suite: Suite, env: NodeJS.ProcessEnv): Promise<Tally> {
  const report = path.join(dataRoot, `${suite}-report.json`);
  fs.rmSync(report, { force: true });
  const status = await run(
    "vitest",
    ["run", "--project", suite, "--reporter=default", "--reporter=json", `--outputFile.json=${report}`, "--passWithNoTests", ...vitestFilters()],
    env,
  );
  if (!fs.existsSync(report)) {
    console.error(`bellwether: the ${suite} suite did not report (exit ${status}); counted as one failure`);
    return { passed: 0, failed: 1, skipped: 0 };
  }
  const json = JSON.parse(fs.readFileSync(report, "utf8")) as {
    numPassedTests: number;
    numFailedTests: number;
    numPendingTests: number;
    numTodoTests: number;
    numFailedTestSuites: number;
  };
  // A file that fails to load has no tests to count but is still a failure.
  const failed = json.numFailedTests + (json.numFailedTests === 0 && status !== 0 ? Math.max(1, json.numFailedTestSuites) : 0);
  return { passed: json.numPassedTests, failed, skipped: json.numPendingTests + json.numTodoTests };
}

/** A whole-tree check (types, lint) counted as one test: it passes or fails as a whole. */
async function runCheck(label: string, bin: string, args: string[]): Promise<Tally> {
  console.log(`bellwether: ${label}`);
  const status = await run(bin, args);
  if (status !== 0) console.error(`bellwether: ${label} failed`);
  return status === 0 ? { passed: 1, failed: 0, skipped: 0 } : { passed: 0, failed: 1, skipped: 0 };
}

/**
 * The demo LIS connection under test: a fixed key, and a rate high enough that no test meets it
 * (a test of the limit makes its own low-limit connection).
 */
const DEMO_LIS = { key: "bwk_test-only-demo-lis-key-for-bellwether-tests", ratePerMinute: 1_000_000 };
const demoLisEnv = { BELLWETHER_DEMO_LIS_KEY: DEMO_LIS.key, BELLWETHER_DEMO_LIS_RATE_PER_MINUTE: String(DEMO_LIS.ratePerMinute) };

async function main(): Promise<number> {
  const wanted = process.argv.slice(2).filter((a): a is Suite => (SUITES as readonly string[]).includes(a));
  const suites: Suite[] = wanted.length ? wanted : [...SUITES];
  // A run that was killed may have left clusters running in the folder about to be deleted.
  stopClustersUnder(dataRoot);
  fs.rmSync(dataRoot, { recursive: true, force: true });
  fs.mkdirSync(dataRoot, { recursive: true });

  const total: Tally = { passed: 0, failed: 0, skipped: 0 };
  const add = (t: Tally) => {
    total.passed += t.passed;
    total.failed += t.failed;
    total.skipped += t.skipped;
  };
  const baseEnv: NodeJS.ProcessEnv = { ...process.env, NODE_ENV: "test", NEXT_TELEMETRY_DISABLED: "1", VITE_CONFIG_NATIVE_IGNORE_WARNING: "true" };

  if (suites.includes("unit")) {
    add(await runCheck("typecheck (tsc --noEmit)", "tsc", ["--noEmit", "-p", "."]));
    add(await runCheck("lint (eslint .)", "eslint", ["."]));
    add(await runVitest("unit", baseEnv));
  }

  const needsStack = suites.some((s) => s !== "unit");
  try {
    if (needsStack) {
      const pgPort = Number(process.env.BELLWETHER_TEST_PG_PORT ?? 54339);
      const appPort = Number(process.env.BELLWETHER_TEST_PORT ?? 3100);
      const external = process.env.BELLWETHER_TEST_DATABASE_URL;
      const step = () => lifetime.signal.throwIfAborted();
      database = await prepareDatabase({
        dataRoot,
        pgPort,
        database: "bellwether_test",
        fresh: true,
        external: external ? { url: external, migrationUrl: process.env.BELLWETHER_TEST_MIGRATION_URL } : undefined,
      });
      step();
      await prepareSchema(database);
      const { seconds } = await seedDemoIfEmpty(database.url, { lis: DEMO_LIS });
      console.log(`bellwether: seeded the demo laboratory (${seconds.toFixed(1)} s)`);
      await buildIfNeeded(lifetime.signal);
      step();
      const baseUrl = `http://127.0.0.1:${appPort}`;
      const secret = crypto.randomBytes(32).toString("base64url");
      // The app sends e-mail to the local fake provider, never to a real one.
      const mail = await prepareMail(dataRoot, {});
      mailFake = mail.fake;
      const appEnv: NodeJS.ProcessEnv = {
        ...process.env,
        ...mail.env,
        // Delivery every 2 s, so that a browser test sees a message reach the fake provider soon.
        BELLWETHER_MAIL_INTERVAL_SECONDS: "2",
        NODE_ENV: "production" as const,
        DATABASE_URL: database.url,
        BELLWETHER_DEMO: "1",
        NEXTAUTH_SECRET: secret,
        NEXTAUTH_URL: baseUrl,
        // Tests simulate clients at other addresses with X-Forwarded-For, as a proxy would send it.
        BELLWETHER_TRUSTED_PROXIES: "127.0.0.1",
        // The sign-in throttle the tests expect, stated here rather than left to the defaults;
        // the per-address limit is low so that reaching it takes few slow password checks.
        BELLWETHER_SIGN_IN_FREE_FAILURES: "3",
        BELLWETHER_SIGN_IN_FIRST_DELAY_SECONDS: "30",
        BELLWETHER_SIGN_IN_MAX_DELAY_MINUTES: "15",
        BELLWETHER_SIGN_IN_ADDRESS_MAX_FAILURES: "10",
        BELLWETHER_SIGN_IN_WINDOW_MINUTES: "60",
        ...demoLisEnv,
      };
      delete appEnv.BELLWETHER_MIGRATION_URL;
      // What the app writes goes to a file that tests read (no secret may appear in it).
      const appLog = path.join(dataRoot, "app.log");
      app = await serveApp({ port: appPort, env: appEnv, quiet: true, logFile: appLog });
      step();
      const testEnv: NodeJS.ProcessEnv = {
        ...baseEnv,
        // The app's role, as the app itself connects; the owner's for the checks that need it.
        DATABASE_URL: database.url,
        NEXTAUTH_SECRET: secret,
        BELLWETHER_BASE_URL: baseUrl,
        CHROMIUM_PATH: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
        BELLWETHER_SCREENSHOT_DIR: path.join(dataRoot, "screenshots"),
        BELLWETHER_TEST_DATA_DIR: dataRoot,
        BELLWETHER_TEST_APP_LOG: appLog,
        // For the tests that run the start command itself, beside the app under test.
        BELLWETHER_TEST_SPARE_PORT: String(appPort + 10),
        BELLWETHER_TEST_SPARE_PG_PORT: String(pgPort + 10),
        // The fake provider the served app sends to, for tests that look at what it received.
        BELLWETHER_TEST_MAIL_URL: mail.env.RESEND_BASE_URL,
        // The demo LIS connection's key and rate, read by tests/support/lis.ts.
        ...demoLisEnv,
      };
      if (database.migrationUrl) testEnv.BELLWETHER_MIGRATION_URL = database.migrationUrl;
      // Tests that create scratch databases need the cluster's superuser; only ours has one.
      if (database.server) testEnv.BELLWETHER_TEST_SUPERUSER_URL = superuserUrl(database.server);
      for (const suite of suites.filter((s) => s !== "unit")) add(await runVitest(suite, testEnv));
    }
  } catch (err) {
    if (lifetime.signal.aborted) throw err;
    console.error(`bellwether: ${err instanceof Error ? err.message : String(err)}`);
    total.failed += 1;
  }

  console.log(`${total.passed} passed, ${total.failed} failed${total.skipped ? `, ${total.skipped} skipped` : ""}`);
  return total.failed > 0 ? 1 : 0;
}

finished = main();
finished.then(
  (code) => exit(code, "done"),
  (err: unknown) => {
    // When interrupted, the signal's stop is already under way.
    if (lifetime.signal.aborted) return;
    say(`bellwether: ${err instanceof Error ? err.message : String(err)}`, process.stderr);
    void exit(1, "error");
  },
);
