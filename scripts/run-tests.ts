/**
 * npm test (after scripts/ensure-system.sh): unit tests, then a fresh private PostgreSQL and the
 * served app for the integration and browser tests. Stops what it started, also on failure, and
 * ends with the line "N passed, N failed". The type check and the linter count as one test each.
 * `npm test -- unit` (or integration, e2e) runs one suite.
 */
import { spawnSync, type ChildProcess } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { stopServer } from "../db/local-server";
import { buildIfNeeded, migrateAndSeed, prepareDatabase, ROOT, serveApp, stopApp, type DatabaseHandle } from "./lib/app-stack";

const SUITES = ["unit", "integration", "e2e"] as const;
type Suite = (typeof SUITES)[number];

interface Tally {
  passed: number;
  failed: number;
  skipped: number;
}

const dataRoot = path.resolve(ROOT, process.env.BELLWETHER_TEST_DATA_DIR ?? ".test-data");

function runVitest(suite: Suite, env: NodeJS.ProcessEnv): Tally {
  const report = path.join(dataRoot, `${suite}-report.json`);
  fs.rmSync(report, { force: true });
  const result = spawnSync(
    path.join(ROOT, "node_modules", ".bin", "vitest"),
    ["run", "--project", suite, "--reporter=default", "--reporter=json", `--outputFile.json=${report}`, "--passWithNoTests"],
    { cwd: ROOT, stdio: "inherit", env },
  );
  if (!fs.existsSync(report)) {
    console.error(`bellwether: the ${suite} suite did not report (exit ${result.status}); counted as one failure`);
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
  const failed = json.numFailedTests + (json.numFailedTests === 0 && result.status !== 0 ? Math.max(1, json.numFailedTestSuites) : 0);
  return { passed: json.numPassedTests, failed, skipped: json.numPendingTests + json.numTodoTests };
}

/** A whole-tree check (types, lint) counted as one test: it passes or fails as a whole. */
function runCheck(label: string, bin: string, args: string[]): Tally {
  console.log(`bellwether: ${label}`);
  const result = spawnSync(path.join(ROOT, "node_modules", ".bin", bin), args, { cwd: ROOT, stdio: "inherit" });
  if (result.status !== 0) console.error(`bellwether: ${label} failed`);
  return result.status === 0 ? { passed: 1, failed: 0, skipped: 0 } : { passed: 0, failed: 1, skipped: 0 };
}

async function main(): Promise<number> {
  const wanted = process.argv.slice(2).filter((a): a is Suite => (SUITES as readonly string[]).includes(a));
  const suites: Suite[] = wanted.length ? wanted : [...SUITES];
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
    add(runCheck("typecheck (tsc --noEmit)", "tsc", ["--noEmit", "-p", "."]));
    add(runCheck("lint (eslint .)", "eslint", ["."]));
    add(runVitest("unit", baseEnv));
  }

  const needsStack = suites.some((s) => s !== "unit");
  let database: DatabaseHandle | null = null;
  let app: ChildProcess | null = null;
  try {
    if (needsStack) {
      const pgPort = Number(process.env.BELLWETHER_TEST_PG_PORT ?? 54339);
      const appPort = Number(process.env.BELLWETHER_TEST_PORT ?? 3100);
      database = await prepareDatabase({ dataRoot, pgPort, database: "bellwether_test", fresh: true, external: process.env.BELLWETHER_TEST_DATABASE_URL });
      await migrateAndSeed(database.url);
      buildIfNeeded();
      const baseUrl = `http://127.0.0.1:${appPort}`;
      const secret = crypto.randomBytes(32).toString("base64url");
      const appEnv = {
        ...process.env,
        NODE_ENV: "production" as const,
        DATABASE_URL: database.url,
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
      };
      app = await serveApp({ port: appPort, env: appEnv, quiet: true });
      const testEnv = {
        ...baseEnv,
        DATABASE_URL: database.url,
        NEXTAUTH_SECRET: secret,
        BELLWETHER_BASE_URL: baseUrl,
        CHROMIUM_PATH: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
        BELLWETHER_SCREENSHOT_DIR: path.join(dataRoot, "screenshots"),
      };
      for (const suite of suites.filter((s) => s !== "unit")) add(runVitest(suite, testEnv));
    }
  } catch (err) {
    console.error(`bellwether: ${err instanceof Error ? err.message : String(err)}`);
    total.failed += 1;
  } finally {
    await stopApp(app);
    if (database?.server) stopServer(database.server);
  }

  console.log(`${total.passed} passed, ${total.failed} failed${total.skipped ? `, ${total.skipped} skipped` : ""}`);
  return total.failed > 0 ? 1 : 0;
}

main().then((code) => process.exit(code));
