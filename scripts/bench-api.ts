/**
 * npm run bench:api — the scoring API's speed beside the framework's floor, in one run. Prints
 * figures and the ratios against the scoring issue's targets; asserts nothing.
 *
 * It builds the app if the sources changed, starts a private PostgreSQL of its own (a fresh
 * database in .bench-data/, seeded with the demo laboratory), the local fake mail provider and the
 * production server, with the demo LIS connection's key chosen here and a rate limit high enough
 * not to be the bottleneck. Then, from a second process (autocannon, over loopback), it measures:
 *   - the API's not-found handler (GET /api/v1/no-such-route: no auth, no database), 32 connections
 *   - single-item POST /api/v1/scores with the key, 32 connections
 *   - 1,000-item batches, 8 connections (scores per second)
 *   - one 10,000-item request (milliseconds; the median of several, after one to warm up), with a
 *     plain answer and with a gzip-compressed one
 * Everything it started is stopped at the end, on an error and on Ctrl-C.
 *
 * Options (environment): BELLWETHER_BENCH_PG_PORT (54349), BELLWETHER_BENCH_PORT (3200),
 * BELLWETHER_BENCH_DATA_DIR (.bench-data), BELLWETHER_BENCH_SECONDS (10 per load, after a 3 s warm-up).
 */
import { spawn, type ChildProcess } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { stopClustersUnder, stopServer } from "../db/local-server";
import type { FakeMailProvider } from "../lib/mail/fake-server";
import { buildIfNeeded, prepareDatabase, prepareMail, prepareSchema, ROOT, seedDemoIfEmpty, serveApp, stopApp, type DatabaseHandle } from "./lib/app-stack";
import { onShutdown, say } from "./lib/shutdown";

/** The scoring issue's targets. */
const TARGETS = { throughputOfFloor: 0.8, p99OfFloor: 1.5, batchScoresPerSecond: 50_000, bigRequestMs: 150 };

const pgPort = Number(process.env.BELLWETHER_BENCH_PG_PORT ?? 54349);
const appPort = Number(process.env.BELLWETHER_BENCH_PORT ?? 3200);
const seconds = Number(process.env.BELLWETHER_BENCH_SECONDS ?? 10);
const dataRoot = path.resolve(ROOT, process.env.BELLWETHER_BENCH_DATA_DIR ?? ".bench-data");
const baseUrl = `http://127.0.0.1:${appPort}`;
/** The demo LIS connection's key for this run (`bwk_` + 43 base64url characters) and its rate. */
const lisKey = `bwk_${crypto.randomBytes(32).toString("base64url")}`;
const LIS_RATE_PER_MINUTE = 10_000_000;

let database: DatabaseHandle | null = null;
let app: ChildProcess | null = null;
let mailFake: FakeMailProvider | null = null;
let load: ChildProcess | null = null;
const lifetime = new AbortController();
let finished: Promise<void> = Promise.resolve();

const exit = onShutdown(
  async (reason) => {
    lifetime.abort();
    if (reason !== "done") say(`bellwether: benchmark stopped (${reason}); stopping what it started`, process.stderr);
    load?.kill("SIGTERM");
    await finished.catch(() => undefined);
    await stopApp(app);
    await mailFake?.close();
    if (database?.server) stopServer(database.server);
  },
  { signalExitCode: (signal) => 128 + os.constants.signals[signal] },
);

/** Demo analytes in force with a plausible value for each, scored with sex and age given. */
const ANALYTES: [code: string, centre: number, spread: number][] = [
  ["NA", 140, 4],
  ["K", 4.2, 0.5],
  ["CA", 2.35, 0.12],
  ["GLU", 5.1, 0.6],
  ["UREA", 5, 1.5],
  ["ALT", 25, 12],
  ["TSH", 1.8, 1],
  ["CREA", 80, 18],
  ["HGB", 140, 14],
];

function items(n: number): unknown[] {
  return Array.from({ length: n }, (_, i) => {
    const [analyte, centre, spread] = ANALYTES[i % ANALYTES.length];
    // Deterministic spread over about ±2 spreads, so that some values fall outside the limits.
    const value = Number((centre + spread * 2 * Math.sin(i * 0.7)).toFixed(2));
    return { analyte, value, sex: i % 2 === 0 ? "F" : "M", ageYears: 20 + (i % 60), ref: `b${i}` };
  });
}

interface LoadResult {
  requestsPerSecond: number;
  p50: number;
  p99: number;
  non2xx: number;
  errors: number;
  total: number;
}

/** Runs autocannon in its own process (`-j`: JSON on stdout) and reads its figures. */
async function autocannon(args: string[]): Promise<LoadResult> {
  lifetime.signal.throwIfAborted();
  const child = spawn(path.join(ROOT, "node_modules", ".bin", "autocannon"), ["-j", ...args], { cwd: ROOT, stdio: ["ignore", "pipe", "pipe"] });
  load = child;
  let out = "";
  let err = "";
  child.stdout.on("data", (d) => (out += d));
  child.stderr.on("data", (d) => (err += d));
  const code = await new Promise<number | null>((resolve) => {
    child.on("error", () => resolve(null));
    child.on("close", (c) => resolve(c));
  });
  load = null;
  lifetime.signal.throwIfAborted();
  if (code !== 0) throw new Error(`autocannon exited with ${code}: ${err.trim()}`);
  const json = JSON.parse(out) as {
    requests: { average: number; total: number };
    latency: { p50: number; p99: number };
    non2xx: number;
    errors: number;
    timeouts: number;
  };
  return {
    requestsPerSecond: json.requests.average,
    p50: json.latency.p50,
    p99: json.latency.p99,
    non2xx: json.non2xx,
    errors: json.errors + json.timeouts,
    total: json.requests.total,
  };
}

/** A warm-up run (not counted), then the measured one. */
async function measure(label: string, args: string[]): Promise<LoadResult> {
  say(`bellwether: ${label}…`);
  await autocannon(["-d", "3", ...args]);
  return autocannon(["-d", String(seconds), ...args]);
}

function postArgs(connections: number, bodyFile: string): string[] {
  return ["-c", String(connections), "-m", "POST", "-H", "content-type=application/json", "-H", `authorization=Bearer ${lisKey}`, "-i", bodyFile, `${baseUrl}/api/v1/scores`];
}

/** One answer looked at before timing, so that a missing route, a refused key or item errors show. */
async function checkAnswer(body: unknown): Promise<string> {
  const res = await fetch(`${baseUrl}/api/v1/scores`, {
    method: "POST",
    headers: { "content-type": "application/json", authorization: `Bearer ${lisKey}` },
    body: JSON.stringify(body),
  });
  const text = await res.text();
  if (res.status !== 200) return `POST /api/v1/scores answered ${res.status}: ${text.slice(0, 300)}`;
  const results = (JSON.parse(text) as { results?: { error?: unknown }[] }).results ?? [];
  const failed = results.filter((r) => r.error).length;
  return failed ? `${failed} of ${results.length} items answered an error, e.g. ${JSON.stringify(results.find((r) => r.error))}` : "";
}

/**
 * Times one large request end to end. `encoding` is the Accept-Encoding sent: "identity" for the
 * plain answer (about 6.4 MB for 10,000 items), "gzip" for the compressed one that a client asking
 * for compression gets (about 0.1 MB, at the cost of compressing it on the server).
 */
async function timeBigRequest(bodyFile: string, runs: number, encoding: "identity" | "gzip"): Promise<number[]> {
  const body = fs.readFileSync(bodyFile);
  const times: number[] = [];
  for (let i = 0; i <= runs; i++) {
    lifetime.signal.throwIfAborted();
    const started = performance.now();
    const res = await fetch(`${baseUrl}/api/v1/scores`, {
      method: "POST",
      headers: { "content-type": "application/json", "accept-encoding": encoding, authorization: `Bearer ${lisKey}` },
      body,
    });
    await res.arrayBuffer();
    const ms = performance.now() - started;
    if (res.status !== 200) throw new Error(`the 10,000-item request answered ${res.status}`);
    if (i > 0) times.push(ms); // the first warms up
  }
  return times;
}

const fmt = (n: number, digits = 0) => n.toLocaleString("en", { maximumFractionDigits: digits, minimumFractionDigits: digits });
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const verdict = (ok: boolean) => (ok ? "meets" : "misses");

async function main(): Promise<void> {
  stopClustersUnder(dataRoot);
  fs.rmSync(dataRoot, { recursive: true, force: true });
  fs.mkdirSync(dataRoot, { recursive: true });
  database = await prepareDatabase({ dataRoot, pgPort, database: "bellwether_bench", fresh: true });
  lifetime.signal.throwIfAborted();
  await prepareSchema(database);
  // The demo LIS connection gets this run's key and a limit that is not the bottleneck.
  const seeded = await seedDemoIfEmpty(database.url, { lis: { key: lisKey, ratePerMinute: LIS_RATE_PER_MINUTE } });
  say(`bellwether: seeded the demo laboratory (${seeded.seconds.toFixed(1)} s)`);
  await buildIfNeeded(lifetime.signal);
  lifetime.signal.throwIfAborted();
  const mail = await prepareMail(dataRoot, {});
  mailFake = mail.fake;
  const appEnv: NodeJS.ProcessEnv = {
    ...process.env,
    ...mail.env,
    NODE_ENV: "production",
    NEXT_TELEMETRY_DISABLED: "1",
    DATABASE_URL: database.url,
    BELLWETHER_DEMO: "1",
    NEXTAUTH_SECRET: crypto.randomBytes(32).toString("base64url"),
    NEXTAUTH_URL: baseUrl,
    BELLWETHER_DEMO_LIS_KEY: lisKey,
    BELLWETHER_DEMO_LIS_RATE_PER_MINUTE: String(LIS_RATE_PER_MINUTE),
  };
  delete appEnv.BELLWETHER_MIGRATION_URL;
  app = await serveApp({ port: appPort, env: appEnv, quiet: true });
  lifetime.signal.throwIfAborted();

  const bodies = path.join(dataRoot, "bodies");
  fs.mkdirSync(bodies, { recursive: true });
  const file = (name: string, n: number) => {
    const p = path.join(bodies, name);
    fs.writeFileSync(p, JSON.stringify({ items: items(n) }));
    return p;
  };
  const single = file("single.json", 1);
  const batch = file("batch-1000.json", 1_000);
  const big = file("batch-10000.json", 10_000);
  for (const n of [1, 1_000]) {
    const problem = await checkAnswer({ items: items(n) });
    if (problem) say(`bellwether: warning: ${problem}; the figures below do not measure real scoring`, process.stderr);
  }

  const floor = await measure("the not-found handler, 32 connections", ["-c", "32", `${baseUrl}/api/v1/no-such-route`]);
  const scores = await measure("single-item scores, 32 connections", postArgs(32, single));
  const batches = await measure("1,000-item batches, 8 connections", postArgs(8, batch));
  say("bellwether: one 10,000-item request, 5 times after one to warm up, plain and then gzip-compressed…");
  const bigTimes = await timeBigRequest(big, 5, "identity");
  const bigGzipTimes = await timeBigRequest(big, 5, "gzip");

  const throughputRatio = scores.requestsPerSecond / floor.requestsPerSecond;
  const p99Ratio = scores.p99 / floor.p99;
  const scoresPerSecond = batches.requestsPerSecond * 1_000;
  const bigMs = median(bigTimes);
  const bigGzipMs = median(bigGzipTimes);
  const rows: string[][] = [
    ["load", "req/s", "p50 ms", "p99 ms", "non-2xx", "errors", "figure", "target", ""],
    ["not-found handler (floor), 32 conn", fmt(floor.requestsPerSecond), fmt(floor.p50), fmt(floor.p99), fmt(floor.non2xx), fmt(floor.errors), "", "", ""],
    [
      "single-item scores, key, 32 conn",
      fmt(scores.requestsPerSecond),
      fmt(scores.p50),
      fmt(scores.p99),
      fmt(scores.non2xx),
      fmt(scores.errors),
      `${fmt(throughputRatio, 2)}× floor req/s; p99 ${fmt(p99Ratio, 2)}× floor`,
      `≥ ${TARGETS.throughputOfFloor}×; ≤ ${TARGETS.p99OfFloor}×`,
      `${verdict(throughputRatio >= TARGETS.throughputOfFloor)}; ${verdict(p99Ratio <= TARGETS.p99OfFloor)}`,
    ],
    [
      "1,000-item batches, 8 conn",
      fmt(batches.requestsPerSecond, 1),
      fmt(batches.p50),
      fmt(batches.p99),
      fmt(batches.non2xx),
      fmt(batches.errors),
      `${fmt(scoresPerSecond)} scores/s`,
      `≥ ${fmt(TARGETS.batchScoresPerSecond)} scores/s`,
      verdict(scoresPerSecond >= TARGETS.batchScoresPerSecond),
    ],
    [
      "one 10,000-item request",
      "",
      "",
      "",
      "",
      "",
      `${fmt(bigMs)} ms (median of ${bigTimes.length}; ${bigTimes.map((t) => fmt(t)).join(", ")})`,
      `< ${TARGETS.bigRequestMs} ms`,
      verdict(bigMs < TARGETS.bigRequestMs),
    ],
    [
      "the same, answer gzip-compressed",
      "",
      "",
      "",
      "",
      "",
      `${fmt(bigGzipMs)} ms (median of ${bigGzipTimes.length}; ${bigGzipTimes.map((t) => fmt(t)).join(", ")})`,
      `< ${TARGETS.bigRequestMs} ms`,
      verdict(bigGzipMs < TARGETS.bigRequestMs),
    ],
  ];
  const widths = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  say("");
  say(`Bellwether API benchmark: ${os.cpus().length} cores, load average ${os.loadavg().map((l) => l.toFixed(1)).join(" ")}, ${seconds} s per load after a 3 s warm-up`);
  for (const r of rows) say(r.map((cell, c) => (c === 0 || c >= 6 ? cell.padEnd(widths[c]) : cell.padStart(widths[c]))).join("  ").trimEnd());
  say("The floor's answers are all 404 problem+json by design (its non-2xx count is its request count).");
  if (os.loadavg()[0] > os.cpus().length) say("note: the machine was busy with other work (load above its core count): the figures are lower and noisier than on an idle machine.");
  if (scores.non2xx > 0 || batches.non2xx > 0) say("note: some score requests were refused (non-2xx): the figures above do not measure scoring alone.");
}

finished = main();
finished.then(
  () => exit(0, "done"),
  (err: unknown) => {
    if (lifetime.signal.aborted) return;
    say(`bellwether: ${err instanceof Error ? err.message : String(err)}`, process.stderr);
    void exit(1, "error");
  },
);
