/**
 * npm run bench:resilience — Bellwether under load and faults. Prints figures and what each check
 * found; asserts nothing (a check that finds something wrong prints a line starting "PROBLEM"), and
 * exits 0 unless it could not run.
 *
 * It builds the app if the sources changed, starts a private PostgreSQL of its own (a fresh
 * database in .bench-resilience-data/, seeded with the demo laboratory), the local fake mail
 * provider and the production server, with the demo LIS connection's key chosen here and a rate
 * limit that is not the bottleneck. Then, from this process (scripts/lib/http-load.ts, which keeps
 * every answer's status and body), four scenarios:
 *   1. Load: 20,000 single-item score requests at 64 connections with the LIS key; errors,
 *      throughput and p99, and that the score log holds one entry per score.
 *   2. PostgreSQL stopped (pg_ctl stop -m fast) for 5 s in the middle of the same load, while
 *      probes send requests that need the database (a signed-in GET, a sign-off): what they got
 *      (503 with Retry-After expected; no hang, no 500, no crash), how long the app took to recover,
 *      whether scores went on from the cache with their log entries written afterwards, and that
 *      no signed version, signature, audit event or queued message was lost or duplicated.
 *   3. Two app instances on one database under score load while the director signs a new version
 *      of HGB: when each instance served the new interval, and that every answer matches one
 *      whole version (interval, model and z), never a mix.
 *   4. The app process killed (SIGKILL) in the middle of a sign-off, several times: held inside
 *      the transaction by a row lock (before its first write, and after the signature's insert),
 *      and at moments spread over a sign-off's duration. Afterwards exactly one version of the
 *      analyte must be in force and the audit trail, signatures and outbox must agree with it.
 * Drafts for the sign-offs are inserted as the app's role (as the tests' helper does) and
 * submitted by the demo scientist through the API; the demo director signs through the API.
 * Everything it started is stopped at the end, on an error and on Ctrl-C.
 *
 * Options (environment): BELLWETHER_RESILIENCE_PG_PORT (54369), BELLWETHER_RESILIENCE_PORT (3260;
 * the second instance uses the next port), BELLWETHER_RESILIENCE_DATA_DIR (.bench-resilience-data),
 * BELLWETHER_RESILIENCE_REQUESTS (20000), BELLWETHER_RESILIENCE_CONNECTIONS (64),
 * BELLWETHER_RESILIENCE_SCENARIOS (a comma-separated subset of load,outage,instances,kill; all).
 */
import { spawn, type ChildProcess } from "node:child_process";
import crypto from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Pool, type PoolClient } from "pg";
import { findPgBin, stopClustersUnder, stopServer, superuserUrl, type LocalServer } from "../db/local-server";
import type { FakeMailProvider } from "../lib/mail/fake-server";
import { buildIfNeeded, hasExited, prepareDatabase, prepareMail, prepareSchema, ROOT, seedDemoIfEmpty, serveApp, stopApp, type DatabaseHandle } from "./lib/app-stack";
import { formatCounts, quantile, runLoad, statusCounts, type LoadRun, type Sample } from "./lib/http-load";
import { onShutdown, say } from "./lib/shutdown";
import { DEMO_USERS } from "../db/demo-accounts";

const pgPort = Number(process.env.BELLWETHER_RESILIENCE_PG_PORT ?? 54369);
const portA = Number(process.env.BELLWETHER_RESILIENCE_PORT ?? 3260);
const portB = portA + 1;
const dataRoot = path.resolve(ROOT, process.env.BELLWETHER_RESILIENCE_DATA_DIR ?? ".bench-resilience-data");
const REQUESTS = Number(process.env.BELLWETHER_RESILIENCE_REQUESTS ?? 20_000);
const CONNECTIONS = Number(process.env.BELLWETHER_RESILIENCE_CONNECTIONS ?? 64);
/** Which scenarios run (all by default): load, outage, instances, kill. */
const SCENARIOS = new Set((process.env.BELLWETHER_RESILIENCE_SCENARIOS ?? "load,outage,instances,kill").split(",").map((x) => x.trim()));
const OUTAGE_MS = 5_000;
/** A request without an answer after this long is a hang. */
const HANG_MS = 15_000;
const urlA = `http://127.0.0.1:${portA}`;
const urlB = `http://127.0.0.1:${portB}`;
const lisKey = `bwk_${crypto.randomBytes(32).toString("base64url")}`;
const LIS_RATE_PER_MINUTE = 10_000_000;
const director = DEMO_USERS.find((u) => u.role === "director")!;
const scientist = DEMO_USERS.find((u) => u.role === "scientist")!;

let database: DatabaseHandle | null = null;
let owner: Pool | null = null;
let appPool: Pool | null = null;
/** The cluster's superuser: only it sees other roles' sessions' states and waits in pg_stat_activity. */
let superuser: Pool | null = null;
const apps = new Map<string, ChildProcess>();
let mailFake: FakeMailProvider | null = null;
const lifetime = new AbortController();
let finished: Promise<void> = Promise.resolve();
const problems: string[] = [];

const exit = onShutdown(
  async (reason) => {
    lifetime.abort();
    if (reason !== "done") say(`bellwether: resilience benchmark stopped (${reason}); stopping what it started`, process.stderr);
    await finished.catch(() => undefined);
    await Promise.all([...apps.values()].map((a) => stopApp(a)));
    await owner?.end().catch(() => undefined);
    await appPool?.end().catch(() => undefined);
    await superuser?.end().catch(() => undefined);
    await mailFake?.close();
    if (database?.server) stopServer(database.server);
  },
  { signalExitCode: (signal) => 128 + os.constants.signals[signal] },
);

// ---------------------------------------------------------------------------------------------
// Reporting

const fmt = (n: number, digits = 0) => n.toLocaleString("en", { maximumFractionDigits: digits, minimumFractionDigits: digits });
const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

function ok(line: string): void {
  say(`  ok       ${line}`);
}
function problem(line: string): void {
  problems.push(line);
  say(`  PROBLEM  ${line}`);
}
function check(condition: boolean, good: string, bad: string): void {
  if (condition) ok(good);
  else problem(bad);
}
function figure(line: string): void {
  say(`  ${line}`);
}

/** A stack trace or a source location in an answer: what an error body must never carry. */
const STACK = /\n\s+at |\bat [^\s]+ \(|\.(?:js|ts|tsx):\d+:\d+/;
/** The same in an HTML page, whose text may say "at 09:30 (UTC)": only a stack frame's shape. */
const PAGE_STACK = /\n\s+at \S+ \(|\.(?:js|ts|tsx):\d+:\d+\)/;

// ---------------------------------------------------------------------------------------------
// The app processes and their logs

const logFile = (label: string) => path.join(dataRoot, `app-${label}.log`);

function appEnv(baseUrl: string, secret: string, mailEnv: Record<string, string>): NodeJS.ProcessEnv {
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    ...mailEnv,
    NODE_ENV: "production",
    NEXT_TELEMETRY_DISABLED: "1",
    DATABASE_URL: database!.url,
    BELLWETHER_DEMO: "1",
    NEXTAUTH_SECRET: secret,
    NEXTAUTH_URL: baseUrl,
    BELLWETHER_DEMO_LIS_KEY: lisKey,
    BELLWETHER_DEMO_LIS_RATE_PER_MINUTE: String(LIS_RATE_PER_MINUTE),
    BELLWETHER_MAIL_INTERVAL_SECONDS: "1",
  };
  delete env.BELLWETHER_MIGRATION_URL;
  return env;
}

let envOf: (label: string) => NodeJS.ProcessEnv = () => {
  throw new Error("the app's environment is not ready");
};

async function startApp(label: "A" | "B"): Promise<ChildProcess> {
  const port = label === "A" ? portA : portB;
  const child = await serveApp({ port, env: envOf(label), quiet: true });
  const log = fs.createWriteStream(logFile(label), { flags: "a" });
  log.write(`--- started ${new Date().toISOString()} (pid ${child.pid})\n`);
  child.stdout?.pipe(log, { end: false });
  child.stderr?.pipe(log, { end: false });
  apps.set(label, child);
  return child;
}

/** Lines of an app's log (all its runs so far) matching `pattern`. */
function logLines(label: string, pattern: RegExp): string[] {
  if (!fs.existsSync(logFile(label))) return [];
  return fs.readFileSync(logFile(label), "utf8").split("\n").filter((l) => pattern.test(l));
}

async function killApp(label: string): Promise<void> {
  const child = apps.get(label);
  if (!child || hasExited(child)) return;
  await new Promise<void>((resolve) => {
    child.once("exit", () => resolve());
    child.kill("SIGKILL");
  });
  apps.delete(label);
}

// ---------------------------------------------------------------------------------------------
// PostgreSQL stopped and started without blocking this process (the load goes on meanwhile)

function pgCtl(server: LocalServer, args: string[]): Promise<void> {
  const file = path.join(findPgBin(), "pg_ctl");
  const isRoot = process.getuid?.() === 0;
  const [cmd, argv] = isRoot ? ["runuser", ["-u", "postgres", "--", file, ...args]] : [file, args];
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, argv, { stdio: ["ignore", "pipe", "pipe"] });
    let out = "";
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    child.on("error", reject);
    child.on("close", (code) => (code === 0 ? resolve() : reject(new Error(`pg_ctl ${args.at(-1)} failed (exit ${code}): ${out.trim()}`))));
  });
}

const stopPostgres = (server: LocalServer) => pgCtl(server, ["-D", server.dataDir, "-m", "fast", "-w", "stop"]);
const startPostgres = (server: LocalServer) =>
  pgCtl(server, ["-D", server.dataDir, "-l", server.logFile, "-w", "-t", "30", "-o", `-c listen_addresses=127.0.0.1 -p ${server.port} -c unix_socket_directories=''`, "start"]);

// ---------------------------------------------------------------------------------------------
// Sessions, drafts and sign-offs through the API

async function signIn(baseUrl: string, email: string, password: string): Promise<string> {
  const csrfRes = await fetch(`${baseUrl}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const jar = csrfRes.headers.getSetCookie().map((c) => c.split(";")[0]);
  const res = await fetch(`${baseUrl}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: jar.join("; "), origin: baseUrl },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }),
  });
  const session = res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .find((c) => c.startsWith("next-auth.session-token="));
  if (!session) throw new Error(`could not sign in as ${email} (status ${res.status})`);
  return [...jar, session].join("; ");
}

async function postJson(baseUrl: string, route: string, cookie: string, body?: unknown, timeoutMs = HANG_MS): Promise<{ status: number; retryAfter: string | null; text: string }> {
  const res = await fetch(`${baseUrl}${route}`, {
    method: "POST",
    headers: { cookie, origin: baseUrl, ...(body === undefined ? {} : { "content-type": "application/json" }) },
    body: body === undefined ? undefined : JSON.stringify(body),
    signal: AbortSignal.timeout(timeoutMs),
  });
  return { status: res.status, retryAfter: res.headers.get("retry-after"), text: await res.text() };
}

interface Cookies {
  scientist: string;
  director: string;
}

interface DraftPartition {
  sex: "F" | "M" | null;
  low: number;
  high: number;
  mean: number;
  sd: number;
}

/** A version of `code` with gaussian partitions, drafted as the scientist and submitted through the API. */
async function draftAndSubmit(baseUrl: string, cookies: Cookies, code: string, partitions: DraftPartition[]): Promise<string> {
  const client = await appPool!.connect();
  let versionId: string;
  try {
    await client.query("BEGIN");
    const { rows } = await client.query<{ id: string }>(
      `INSERT INTO interval_versions (analyte_id, number, unit, decimals, created_by, updated_by)
       SELECT a.id, COALESCE((SELECT max(number) FROM interval_versions WHERE analyte_id = a.id), 0) + 1, a.unit, a.decimals, u.id, u.id
       FROM analytes a, users u WHERE a.code = $1 AND u.email = $2 RETURNING id`,
      [code, scientist.email],
    );
    versionId = rows[0].id;
    for (const [i, p] of partitions.entries()) {
      await client.query(
        `INSERT INTO interval_partitions (version_id, position, sex, low, high, method, n, model) VALUES ($1, $2, $3, $4, $5, 'parametric', 240, $6)`,
        [versionId, i + 1, p.sex, p.low, p.high, JSON.stringify({ kind: "gaussian", transform: "none", mean: p.mean, sd: p.sd })],
      );
    }
    await client.query("COMMIT");
  } catch (err) {
    await client.query("ROLLBACK");
    throw err;
  } finally {
    client.release();
  }
  const submitted = await postJson(baseUrl, `/api/v1/interval-versions/${versionId}/submit`, cookies.scientist);
  if (submitted.status !== 200) throw new Error(`submitting a draft of ${code} answered ${submitted.status}: ${submitted.text.slice(0, 300)}`);
  return versionId;
}

const signBody = { meaning: "approved_for_clinical_use", password: director.password, email: director.email };

/** Limits 1.96 SD either side of the mean, on the analyte's decimals: a plausible new version. */
function gaussianPartition(sex: "F" | "M" | null, mean: number, sd: number, decimals: number): DraftPartition {
  const round = (x: number) => Number(x.toFixed(decimals));
  return { sex, mean, sd, low: round(mean - 1.959964 * sd), high: round(mean + 1.959964 * sd) };
}

// ---------------------------------------------------------------------------------------------
// What must survive: signed versions, signatures, audit events, queued messages

interface Ledger {
  versions: Map<string, string>;
  signatures: Map<string, string>;
  audit: Map<string, string>;
  outbox: Map<string, string>;
}

async function readLedger(): Promise<Ledger> {
  const rows = async (sql: string) => new Map((await owner!.query<{ id: string; h: string }>(sql)).rows.map((r) => [r.id, r.h]));
  return {
    versions: await rows(
      `SELECT id::text, md5(concat_ws('|', analyte_id, number, unit, decimals, critical_low, critical_high, effective_from, created_by)) AS h
       FROM interval_versions WHERE state IN ('in_force', 'superseded', 'withdrawn')`,
    ),
    signatures: await rows(`SELECT id::text, md5(row(s.*)::text) AS h FROM signatures s`),
    audit: await rows(`SELECT id::text, md5(row(a.*)::text) AS h FROM audit_events a`),
    outbox: await rows(`SELECT id::text, md5(concat_ws('|', kind, recipients::text, subject, text, entity_type, entity_id)) AS h FROM outbox`),
  };
}

/** Every row of `before` is in `after`, unchanged; says what was lost or altered. */
function compareLedgers(before: Ledger, after: Ledger): void {
  for (const key of ["versions", "signatures", "audit", "outbox"] as const) {
    const name = { versions: "signed versions", signatures: "signatures", audit: "audit events", outbox: "queued messages (outbox rows)" }[key];
    let lost = 0;
    let altered = 0;
    for (const [id, h] of before[key]) {
      const now = after[key].get(id);
      if (now === undefined) lost++;
      else if (now !== h) altered++;
    }
    check(
      lost === 0 && altered === 0,
      `${name}: all ${fmt(before[key].size)} from before are there, unchanged (${fmt(after[key].size)} now)`,
      `${name}: ${lost} lost and ${altered} changed of the ${fmt(before[key].size)} from before`,
    );
  }
}

/** Duplicates that a retried write would leave: two sign-offs of one version, one message twice. */
async function checkNoDuplicates(): Promise<void> {
  const dupSigned = await owner!.query<{ n: string }>(
    `SELECT count(*) AS n FROM (SELECT entity_id FROM audit_events WHERE action = 'interval_version.signed' GROUP BY entity_id HAVING count(*) > 1) d`,
  );
  check(dupSigned.rows[0].n === "0", "no version has two 'signed' audit events", `${dupSigned.rows[0].n} versions have more than one 'signed' audit event`);
  const dupSignatures = await owner!.query<{ n: string }>(
    `SELECT count(*) AS n FROM (SELECT version_id FROM signatures WHERE meaning = 'approved_for_clinical_use' GROUP BY version_id HAVING count(*) > 1) d`,
  );
  check(dupSignatures.rows[0].n === "0", "no version has two sign-off signatures", `${dupSignatures.rows[0].n} versions have more than one sign-off signature`);
  const inForce = await owner!.query<{ n: string }>(`SELECT count(*) AS n FROM (SELECT analyte_id FROM interval_versions WHERE state = 'in_force' GROUP BY analyte_id HAVING count(*) > 1) d`);
  check(inForce.rows[0].n === "0", "no analyte has two versions in force", `${inForce.rows[0].n} analytes have more than one version in force`);
  const dupMessages = await owner!.query<{ n: string }>(
    `SELECT count(*) AS n FROM (SELECT kind, entity_id, recipients FROM outbox WHERE entity_id IS NOT NULL AND kind LIKE 'version.%'
       GROUP BY kind, entity_id, recipients HAVING count(*) > 1) d`,
  );
  check(dupMessages.rows[0].n === "0", "no version message is queued twice for the same recipients", `${dupMessages.rows[0].n} version messages are queued more than once`);
}

/** Waits (up to 30 s) for the outbox to be delivered, then compares it with what the provider received. */
async function checkMailDelivered(): Promise<void> {
  const deadline = Date.now() + 30_000;
  let queued = -1;
  while (Date.now() < deadline) {
    queued = Number((await owner!.query<{ n: string }>(`SELECT count(*) AS n FROM outbox WHERE status = 'queued'`)).rows[0].n);
    if (queued === 0) break;
    await sleep(500);
  }
  const sent = (await owner!.query<{ id: string }>(`SELECT id::text FROM outbox WHERE status = 'sent'`)).rows.map((r) => r.id);
  const failed = Number((await owner!.query<{ n: string }>(`SELECT count(*) AS n FROM outbox WHERE status = 'failed'`)).rows[0].n);
  const received = new Map<string, number>();
  for (const m of mailFake?.messages() ?? []) if (m.idempotencyKey) received.set(m.idempotencyKey, (received.get(m.idempotencyKey) ?? 0) + 1);
  const missing = sent.filter((id) => !received.has(id)).length;
  const twice = [...received.values()].filter((n) => n > 1).length;
  figure(`outbox: ${fmt(sent.length)} sent, ${queued} still queued, ${failed} failed; the provider accepted ${fmt(mailFake?.messages().length ?? 0)} messages from ${fmt(mailFake?.requests() ?? 0)} send requests (a retried send repeats the row's Idempotency-Key)`);
  check(queued === 0 && failed === 0, "every queued message was delivered", `${queued} messages still queued and ${failed} failed 30 s after the load`);
  check(missing === 0 && twice === 0, "each sent message reached the provider exactly once", `${missing} sent messages never reached the provider; ${twice} reached it twice`);
}

// ---------------------------------------------------------------------------------------------
// Scores

const SCORE_PATH = "/api/v1/scores";
const keyHeaders = { "content-type": "application/json", authorization: `Bearer ${lisKey}` };
const ANALYTES: [string, number, number][] = [
  ["NA", 140, 4],
  ["K", 4.2, 0.5],
  ["GLU", 5.1, 0.6],
  ["ALT", 25, 12],
  ["TSH", 1.8, 1],
];
function singleItem(i: number): string {
  const [analyte, centre, spread] = ANALYTES[i % ANALYTES.length];
  const value = Number((centre + spread * 2 * Math.sin(i * 0.7)).toFixed(2));
  return JSON.stringify({ items: [{ analyte, value, sex: i % 2 === 0 ? "F" : "M", ageYears: 20 + (i % 60) }] });
}

async function lisConnectionId(): Promise<string> {
  const { rows } = await owner!.query<{ id: string }>(`SELECT id::text FROM lis_connections WHERE key_sha256 = $1`, [crypto.createHash("sha256").update(lisKey).digest("hex")]);
  if (!rows[0]) throw new Error("the demo LIS connection was not seeded with this run's key");
  return rows[0].id;
}

async function scoreLogCount(connectionId: string): Promise<number> {
  return Number((await owner!.query<{ n: string }>(`SELECT count(*) AS n FROM score_log WHERE caller_id = $1`, [connectionId])).rows[0].n);
}

/** Waits until the score log holds `expected` more entries than `before` or stops growing for 5 s. */
async function settleScoreLog(connectionId: string, before: number, expected: number): Promise<number> {
  let last = -1;
  let stableSince = Date.now();
  const deadline = Date.now() + 60_000;
  for (;;) {
    const n = (await scoreLogCount(connectionId)) - before;
    if (n === expected) return n;
    if (n !== last) {
      last = n;
      stableSince = Date.now();
    }
    if (Date.now() - stableSince > 5_000 || Date.now() > deadline) return n;
    await sleep(250);
  }
}

function loadFigures(label: string, run: LoadRun, samples: readonly Sample[] = run.samples): void {
  const seconds = (run.endedAt - run.startedAt) / 1000;
  const ms = samples.map((s) => s.doneAt - s.sentAt);
  figure(
    `${label}: ${fmt(samples.length)} requests in ${fmt(seconds, 1)} s = ${fmt(samples.length / seconds)} req/s; latency p50 ${fmt(quantile(ms, 0.5))} ms, p99 ${fmt(quantile(ms, 0.99))} ms, max ${fmt(Math.max(...ms))} ms`,
  );
  figure(`${label}: answers ${formatCounts(statusCounts(samples))}`);
}

/** Non-2xx answers must be problem+json without a stack; no answer may be missing. */
function checkAnswers(label: string, samples: readonly Sample[], allowed: readonly number[]): void {
  const hung = samples.filter((s) => s.error === "timeout").length;
  const noAnswer = samples.filter((s) => s.status === 0 && s.error !== "timeout").length;
  const e500 = samples.filter((s) => s.status >= 500 && s.status !== 503);
  const unexpected = samples.filter((s) => s.status !== 0 && !allowed.includes(s.status));
  const stacks = samples.filter((s) => s.body !== null && s.status >= 400 && STACK.test(s.body));
  const notProblem = samples.filter((s) => s.status >= 400 && !(s.contentType ?? "").includes("problem+json"));
  const no503RetryAfter = samples.filter((s) => (s.status === 503 || s.status === 429) && !s.retryAfter);
  check(hung === 0, `${label}: no request hung (none waited ${HANG_MS / 1000} s)`, `${label}: ${hung} requests had no answer after ${HANG_MS / 1000} s`);
  check(noAnswer === 0, `${label}: every request got an HTTP answer`, `${label}: ${noAnswer} requests got no HTTP answer (connection refused or reset)`);
  check(e500.length === 0, `${label}: no 500`, `${label}: ${e500.length} answers were 5xx other than 503, e.g. ${e500[0]?.status} ${e500[0]?.body?.slice(0, 200)}`);
  check(unexpected.length === 0, `${label}: only ${allowed.join("/")} answers`, `${label}: ${unexpected.length} answers outside ${allowed.join("/")}, e.g. ${unexpected[0]?.status} ${unexpected[0]?.body?.slice(0, 300)}`);
  if (unexpected.length) {
    const t0 = Math.min(...samples.map((s) => s.sentAt));
    for (const target of new Set(unexpected.map((s) => s.target))) {
      const mine = unexpected.filter((s) => s.target === target);
      figure(
        `    on ${target}: ${mine.length} sent from ${fmt((mine[0].sentAt - t0) / 1000, 2)} s to ${fmt((mine[mine.length - 1].sentAt - t0) / 1000, 2)} s into the load; Retry-After ${[...new Set(mine.map((s) => s.retryAfter))].join(", ")}`,
      );
    }
  }
  check(stacks.length === 0, `${label}: no error body carries a stack trace`, `${label}: ${stacks.length} error bodies carry a stack trace`);
  check(notProblem.length === 0, `${label}: every error is application/problem+json`, `${label}: ${notProblem.length} errors are not problem+json (e.g. ${notProblem[0]?.contentType})`);
  check(no503RetryAfter.length === 0, `${label}: every 503/429 says Retry-After`, `${label}: ${no503RetryAfter.length} 503/429 answers lack Retry-After`);
}

// ---------------------------------------------------------------------------------------------
// Scenario 1: load

async function scenarioLoad(connectionId: string): Promise<void> {
  say(`\n1. Load: ${fmt(REQUESTS)} single-item score requests at ${CONNECTIONS} connections, LIS key (rate limit ${fmt(LIS_RATE_PER_MINUTE)}/min)`);
  await runLoad({ targets: [{ baseUrl: urlA, label: "A" }], connections: CONNECTIONS, method: "POST", path: SCORE_PATH, headers: keyHeaders, body: singleItem, total: 2_000, timeoutMs: HANG_MS });
  await settleScoreLog(connectionId, 0, -1);
  const before = await scoreLogCount(connectionId);
  const run = await runLoad({ targets: [{ baseUrl: urlA, label: "A" }], connections: CONNECTIONS, method: "POST", path: SCORE_PATH, headers: keyHeaders, body: singleItem, total: REQUESTS, timeoutMs: HANG_MS });
  loadFigures("scores", run);
  const errors = run.samples.filter((s) => s.status !== 200).length;
  check(errors === 0, "zero errors: every request answered 200", `${errors} of ${run.samples.length} requests did not answer 200`);
  checkAnswers("scores", run.samples, [200]);
  const logged = await settleScoreLog(connectionId, before, run.samples.length - errors);
  check(logged === run.samples.length - errors, `score log: ${fmt(logged)} entries written, one per score`, `score log: ${fmt(logged)} entries written for ${fmt(run.samples.length - errors)} scores`);
}

// ---------------------------------------------------------------------------------------------
// Scenario 2: PostgreSQL stopped for 5 s during the load

interface Probe {
  at: number;
  status: number;
  retryAfter: string | null;
  ms: number;
  body: string;
}

async function probeLoop(signal: AbortSignal, send: () => Promise<Response>, everyMs: number): Promise<Probe[]> {
  const out: Probe[] = [];
  while (!signal.aborted) {
    const at = performance.now();
    try {
      const res = await send();
      out.push({ at, status: res.status, retryAfter: res.headers.get("retry-after"), ms: performance.now() - at, body: await res.text() });
    } catch (err) {
      out.push({ at, status: 0, retryAfter: null, ms: performance.now() - at, body: err instanceof Error ? `${err.name}: ${err.message}` : String(err) });
    }
    await sleep(everyMs);
  }
  return out;
}

async function scenarioOutage(connectionId: string, cookies: Cookies): Promise<void> {
  say(`\n2. PostgreSQL stopped for ${OUTAGE_MS / 1000} s in the middle of ${fmt(REQUESTS)} score requests at ${CONNECTIONS} connections`);
  const server = database!.server!;
  // Messages in flight when the database goes: a sign-off just before queues several.
  const kVersion = await draftAndSubmit(urlA, cookies, "K", [gaussianPartition(null, 4.25, 0.33, 1)]);
  const signedBefore = await postJson(urlA, `/api/v1/interval-versions/${kVersion}/sign`, cookies.director, signBody);
  if (signedBefore.status !== 200) throw new Error(`signing K before the outage answered ${signedBefore.status}: ${signedBefore.text.slice(0, 300)}`);
  // A version to sign while the database is away (expected: 503, nothing changed).
  const gluVersion = await draftAndSubmit(urlA, cookies, "GLU", [gaussianPartition(null, 5.15, 0.52, 1)]);
  await settleScoreLog(connectionId, 0, -1);
  const ledgerBefore = await readLedger();
  const logBefore = await scoreLogCount(connectionId);
  const unhandledBefore = logLines("A", /Unhandled error|Request failed/).length;

  const probesStop = new AbortController();
  const sessionProbe = probeLoop(probesStop.signal, () => fetch(`${urlA}/api/v1/me`, { headers: { cookie: cookies.director }, signal: AbortSignal.timeout(HANG_MS) }), 200);
  const catalogueProbe = probeLoop(probesStop.signal, () => fetch(`${urlA}/api/v1/analytes`, { headers: { authorization: `Bearer ${lisKey}` }, signal: AbortSignal.timeout(HANG_MS) }), 200);
  const pageProbe = probeLoop(probesStop.signal, () => fetch(`${urlA}/`, { headers: { cookie: cookies.director }, redirect: "manual", signal: AbortSignal.timeout(HANG_MS) }), 500);

  let stoppedAt = 0;
  let startedAt = 0;
  let outage: Promise<void> | null = null;
  // Set inside the load's callback, which TypeScript's narrowing does not follow: hence a holder.
  const signDuring: { answer: Promise<{ status: number; retryAfter: string | null; text: string }> | null } = { answer: null };
  const run = await runLoad({
    targets: [{ baseUrl: urlA, label: "A" }],
    connections: CONNECTIONS,
    method: "POST",
    path: SCORE_PATH,
    headers: keyHeaders,
    body: singleItem,
    total: REQUESTS,
    timeoutMs: HANG_MS,
    onSample: (_s, completed) => {
      if (outage || completed < REQUESTS / 4) return;
      outage = (async () => {
        const t0 = performance.now();
        await stopPostgres(server);
        stoppedAt = performance.now();
        figure(`PostgreSQL stopped (pg_ctl stop -m fast took ${fmt(stoppedAt - t0)} ms) after ${fmt(completed)} requests`);
        await sleep(1_000);
        signDuring.answer = postJson(urlA, `/api/v1/interval-versions/${gluVersion}/sign`, cookies.director, signBody).catch((err: unknown) => ({ status: 0, retryAfter: null, text: String(err) }));
        await sleep(OUTAGE_MS - 1_000);
        await startPostgres(server);
        startedAt = performance.now();
        figure(`PostgreSQL started again ${fmt((startedAt - stoppedAt) / 1000, 1)} s after it stopped`);
      })();
    },
  });
  if (outage) await outage;
  // Probes go on a few seconds after the load, to see the recovery.
  const recoveryDeadline = performance.now() + 20_000;
  let recovered: number | null = null;
  while (performance.now() < recoveryDeadline) {
    const res = await fetch(`${urlA}/api/v1/me`, { headers: { cookie: cookies.director } }).catch(() => null);
    if (res?.status === 200 && startedAt) {
      recovered = performance.now();
      break;
    }
    await sleep(100);
  }
  probesStop.abort();
  const sessions = await sessionProbe;
  const catalogue = await catalogueProbe;
  const pages = await pageProbe;

  loadFigures("scores", run);
  if (!stoppedAt) {
    problem("the load ended before PostgreSQL could be stopped: raise BELLWETHER_RESILIENCE_REQUESTS");
    return;
  }
  figure("the load around the outage, by the second the request was sent (t = 0: PostgreSQL stopped):");
  for (let t = -3; t < (startedAt - stoppedAt) / 1000 + 6; t++) {
    const bucket = run.samples.filter((s) => s.sentAt >= stoppedAt + t * 1000 && s.sentAt < stoppedAt + (t + 1) * 1000);
    if (!bucket.length) continue;
    const ms = bucket.map((s) => s.doneAt - s.sentAt);
    const marks = `${stoppedAt + t * 1000 < startedAt && stoppedAt + (t + 1) * 1000 > stoppedAt ? " (database down)" : ""}`;
    figure(`  t ${t >= 0 ? "+" : ""}${t} s: ${fmt(bucket.length)} sent; p50 ${fmt(quantile(ms, 0.5))} ms, max ${fmt(Math.max(...ms))} ms; ${formatCounts(statusCounts(bucket))}${marks}`);
  }
  figure("signed-in GET /api/v1/me around the outage (sent at t, answered after):");
  const near = sessions.filter((p) => p.at > stoppedAt - 2_000 && p.at < startedAt + 3_000);
  for (let i = 0; i < near.length; i += 6) {
    figure(`    ${near.slice(i, i + 6).map((p) => `t ${fmt((p.at - stoppedAt) / 1000, 1)} s: ${p.status || "none"} in ${fmt(p.ms)} ms`).join("; ")}`);
  }
  const during = run.samples.filter((s) => s.sentAt >= stoppedAt && s.sentAt < startedAt);
  figure(`scores sent while PostgreSQL was down: ${fmt(during.length)}; answers ${formatCounts(statusCounts(during))}`);
  checkAnswers("scores", run.samples, [200, 503]);
  const firstSessionOk = sessions.find((p) => p.at >= startedAt && p.status === 200);
  // Sent and answered while PostgreSQL was down (a request sent before it stopped may have had its data).
  const awaySessions = sessions.filter((p) => p.at >= stoppedAt && p.at + p.ms < startedAt);
  figure(`signed-in GET /api/v1/me every 200 ms: ${formatCounts(new Map(Object.entries(countBy(sessions.map((p) => String(p.status))))))}; while down ${formatCounts(new Map(Object.entries(countBy(awaySessions.map((p) => String(p.status))))))}, slowest ${fmt(Math.max(0, ...awaySessions.map((p) => p.ms)))} ms`);
  figure(`LIS GET /api/v1/analytes every 200 ms: ${formatCounts(new Map(Object.entries(countBy(catalogue.map((p) => String(p.status))))))}`);
  const awayPages = pages.filter((p) => p.at >= stoppedAt && p.at + p.ms < startedAt);
  figure(
    `the director's overview page (GET /) every 500 ms: ${formatCounts(new Map(Object.entries(countBy(pages.map((p) => String(p.status))))))}; while down ${formatCounts(new Map(Object.entries(countBy(awayPages.map((p) => String(p.status))))))}`,
  );
  check(pages.every((p) => p.status !== 0 && !PAGE_STACK.test(p.body)), "the overview page always answered, without a stack trace", "the overview page hung or showed a stack trace");
  for (const [label, probes] of [
    ["signed-in GET /api/v1/me", sessions],
    ["LIS GET /api/v1/analytes", catalogue],
  ] as const) {
    const bad = probes.filter((p) => ![200, 503].includes(p.status));
    const stack = probes.filter((p) => p.status >= 400 && STACK.test(p.body));
    const noRetry = probes.filter((p) => p.status === 503 && !p.retryAfter);
    check(bad.length === 0, `${label}: only 200 or 503`, `${label}: ${bad.length} answers other than 200/503, e.g. ${bad[0]?.status} ${bad[0]?.body.slice(0, 200)}`);
    check(stack.length === 0 && noRetry.length === 0, `${label}: each 503 with Retry-After and no stack`, `${label}: ${noRetry.length} 503s without Retry-After, ${stack.length} bodies with a stack`);
  }
  check(awaySessions.every((p) => p.status === 503), "requests that need the database got 503 while it was down", `requests that need the database got ${formatCounts(new Map(Object.entries(countBy(awaySessions.map((p) => String(p.status))))))} while it was down`);
  const sign = signDuring.answer ? await signDuring.answer : null;
  figure(`a sign-off sent while PostgreSQL was down answered ${sign?.status} (Retry-After ${sign?.retryAfter ?? "none"})`);
  check(sign?.status === 503 && sign.retryAfter !== null, "the sign-off sent while down answered 503 with Retry-After", `the sign-off sent while down answered ${sign?.status}: ${sign?.text.slice(0, 200)}`);
  const recoveredAt = firstSessionOk ? firstSessionOk.at + firstSessionOk.ms : recovered;
  if (recoveredAt) figure(`the app answered a signed-in request 200 ${fmt(recoveredAt - startedAt)} ms after PostgreSQL was back`);
  check(recoveredAt !== null, "the app recovered by itself", "the app did not serve a signed-in request within 20 s of PostgreSQL's return");
  check(!hasExited(apps.get("A")!), "the app process is still running", "the app process ended");
  const unhandled = logLines("A", /Unhandled error|Request failed/).slice(unhandledBefore);
  check(unhandled.length === 0, "the app's log has no unhandled error", `the app's log has ${unhandled.length} unhandled errors, e.g. ${unhandled[0]}`);

  const gluState = (await owner!.query<{ state: string }>(`SELECT state FROM interval_versions WHERE id = $1`, [gluVersion])).rows[0].state;
  const gluSignatures = Number((await owner!.query<{ n: string }>(`SELECT count(*) AS n FROM signatures WHERE version_id = $1`, [gluVersion])).rows[0].n);
  check(gluState === "awaiting_signoff" && gluSignatures === 0, "the version whose sign-off was refused is still awaiting sign-off, unsigned", `the version signed during the outage is ${gluState} with ${gluSignatures} signatures`);
  // Signing it now: the listening connection must have come back for the change to reach the cache.
  const signedAfter = await postJson(urlA, `/api/v1/interval-versions/${gluVersion}/sign`, cookies.director, signBody);
  if (signedAfter.status === 200) {
    const t = performance.now();
    let served = false;
    while (performance.now() - t < 5_000 && !served) {
      const res = await fetch(`${urlA}/api/v1/analytes/GLU/intervals`, { headers: { authorization: `Bearer ${lisKey}` } });
      served = res.ok && ((await res.json()) as { version?: { id?: string } }).version?.id === gluVersion;
      if (!served) await sleep(50);
    }
    check(served, `a version signed after the recovery was served ${fmt(performance.now() - t)} ms after its sign-off answered`, "a version signed after the recovery was not served within 5 s (the change notification did not arrive)");
  } else problem(`signing after the recovery answered ${signedAfter.status}: ${signedAfter.text.slice(0, 200)}`);

  const scored = run.samples.filter((s) => s.status === 200).length;
  // A request whose answer did not arrive within HANG_MS may still have been scored and logged.
  const unanswered = run.samples.filter((s) => s.status === 0).length;
  const logged = await settleScoreLog(connectionId, logBefore, scored + unanswered);
  check(
    logged >= scored && logged <= scored + unanswered,
    `score log: ${fmt(logged)} entries for ${fmt(scored)} scores answered${unanswered ? ` and ${unanswered} requests not answered in time` : ""} (those made while PostgreSQL was down written afterwards)`,
    `score log: ${fmt(logged)} entries for ${fmt(scored)} scores answered and ${unanswered} not answered in time: ${logged < scored ? "entries lost" : "entries duplicated"}`,
  );
  compareLedgers(ledgerBefore, await readLedger());
  await checkNoDuplicates();
  await checkMailDelivered();
}

function countBy(xs: readonly string[]): Record<string, number> {
  const out: Record<string, number> = {};
  for (const x of xs) out[x] = (out[x] ?? 0) + 1;
  return out;
}

// ---------------------------------------------------------------------------------------------
// Scenario 3: two instances while a version is signed

interface StoredPartition {
  versionId: string;
  low: number | null;
  high: number | null;
  model: { kind: string; transform?: string; lambda?: number; mean?: number; sd?: number };
}

async function storedPartitions(versionIds: string[]): Promise<Map<string, StoredPartition>> {
  const { rows } = await owner!.query<{ id: string; version_id: string; low: number | null; high: number | null; model: StoredPartition["model"] }>(
    `SELECT id::text, version_id::text, low, high, model FROM interval_partitions WHERE version_id = ANY($1::uuid[])`,
    [versionIds],
  );
  return new Map(rows.map((r) => [r.id, { versionId: r.version_id, low: r.low, high: r.high, model: r.model }]));
}

/** z of a gaussian model (METHODS.md: z = (g(x) − mean)/sd, g the identity, ln or Box-Cox). */
function gaussianZ(m: StoredPartition["model"], x: number): number | null {
  if (m.kind !== "gaussian" || m.mean === undefined || m.sd === undefined) return null;
  const g = m.transform === "ln" ? Math.log(x) : m.transform === "box-cox" ? (m.lambda === 0 ? Math.log(x) : (x ** m.lambda! - 1) / m.lambda!) : x;
  return (g - m.mean) / m.sd;
}

async function scenarioTwoInstances(cookies: Cookies): Promise<void> {
  say(`\n3. Two app instances on one database under score load while the director signs a new version of HGB`);
  await startApp("B");
  const old = (await owner!.query<{ id: string }>(`SELECT v.id::text FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = 'HGB' AND v.state = 'in_force'`)).rows[0]?.id;
  if (!old) throw new Error("the demo has no HGB version in force");
  const fresh = await draftAndSubmit(urlA, cookies, "HGB", [gaussianPartition("F", 133, 8.5, 0), gaussianPartition("M", 151, 9.5, 0)]);
  const partitions = await storedPartitions([old, fresh]);
  const VALUE = 141;
  const stop = new AbortController();
  const connections = Math.max(1, Math.floor(CONNECTIONS / 4));
  const loading = runLoad({
    targets: [
      { baseUrl: urlA, label: "A" },
      { baseUrl: urlB, label: "B" },
    ],
    connections,
    method: "POST",
    path: SCORE_PATH,
    headers: keyHeaders,
    body: (i) => JSON.stringify({ items: [{ analyte: "HGB", value: VALUE, sex: i % 2 === 0 ? "F" : "M", ageYears: 45 }] }),
    signal: stop.signal,
    timeoutMs: HANG_MS,
    keep2xxBodies: true,
  });
  await sleep(3_000);
  const signSent = performance.now();
  const signed = await postJson(urlA, `/api/v1/interval-versions/${fresh}/sign`, cookies.director, signBody, 120_000);
  const signDone = performance.now();
  await sleep(3_000);
  stop.abort();
  const run = await loading;
  if (signed.status !== 200) {
    problem(`the sign-off answered ${signed.status}: ${signed.text.slice(0, 200)}`);
    return;
  }
  figure(`the sign-off took ${fmt(signDone - signSent)} ms (sent at t = 0; the figures below count from its answer)`);
  loadFigures(`scores on A and B, ${connections} connections each`, run);
  checkAnswers("scores", run.samples, [200]);

  let mixed = 0;
  let mixedExample = "";
  for (const target of ["A", "B"]) {
    const mine = run.samples.filter((s) => s.target === target && s.status === 200);
    const answers = mine.map((s) => {
      const r = (JSON.parse(s.body!) as { results: { z: number; interval: { versionId: string; partitionId: string; low: number; high: number }; model: { kind: string; mean?: number; sd?: number } }[] }).results[0];
      const stored = partitions.get(r.interval.partitionId);
      const z = stored ? gaussianZ(stored.model, VALUE) : null;
      const whole =
        stored !== undefined &&
        stored.versionId === r.interval.versionId &&
        stored.low === r.interval.low &&
        stored.high === r.interval.high &&
        stored.model.kind === r.model.kind &&
        stored.model.mean === r.model.mean &&
        stored.model.sd === r.model.sd &&
        (z === null || Math.abs(z - r.z) < 1e-6 * Math.max(1, Math.abs(z)));
      if (!whole) {
        mixed++;
        mixedExample ||= `${target}: ${JSON.stringify({ interval: r.interval, model: r.model, z: r.z })}`;
      }
      return { sentAt: s.sentAt, doneAt: s.doneAt, version: r.interval.versionId };
    });
    const firstNew = answers.filter((a) => a.version === fresh).sort((a, b) => a.doneAt - b.doneAt)[0];
    const lastOld = answers.filter((a) => a.version === old).sort((a, b) => b.sentAt - a.sentAt)[0];
    const regressions = firstNew ? answers.filter((a) => a.version === old && a.sentAt > firstNew.doneAt).length : 0;
    const lag = lastOld ? lastOld.sentAt - signDone : -Infinity;
    figure(
      `instance ${target}: ${fmt(answers.length)} scores; first answer with the new version ${firstNew ? `${fmt(firstNew.doneAt - signDone)} ms` : "never"}; last request answered with the old version sent at ${lastOld ? `${fmt(lag)} ms` : "—"} (relative to the sign-off's answer)`,
    );
    check(firstNew !== undefined && lag < 1_000, `instance ${target} served the new interval within a second of the sign-off`, `instance ${target} still answered the old version to a request sent ${fmt(lag)} ms after the sign-off`);
    check(regressions === 0, `instance ${target} never went back to the old version after serving the new`, `instance ${target} answered the old version ${regressions} times after it had served the new`);
  }
  check(mixed === 0, "every score matched one whole version (partition, limits, model and z)", `${mixed} scores mixed versions or did not match their stated model, e.g. ${mixedExample}`);
  await stopApp(apps.get("B") ?? null);
  apps.delete("B");
}

// ---------------------------------------------------------------------------------------------
// Scenario 4: the app killed in the middle of a sign-off

interface SignOutcome {
  inForce: string[];
  newState: string;
  signatures: number;
  signedEvents: number;
  supersededEvents: number;
  messages: number;
}

async function outcomeOf(analyteCode: string, oldId: string, newId: string): Promise<SignOutcome> {
  const q = async (sql: string, params: unknown[]) => (await owner!.query(sql, params)).rows;
  const inForce = (await q(`SELECT v.id::text FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = $1 AND v.state = 'in_force'`, [analyteCode])).map((r) => r.id as string);
  const [{ state: newState }] = await q(`SELECT state FROM interval_versions WHERE id = $1`, [newId]);
  const [{ n: signatures }] = await q(`SELECT count(*)::int AS n FROM signatures WHERE version_id = $1`, [newId]);
  const [{ n: signedEvents }] = await q(`SELECT count(*)::int AS n FROM audit_events WHERE action = 'interval_version.signed' AND entity_id = $1`, [newId]);
  const [{ n: supersededEvents }] = await q(`SELECT count(*)::int AS n FROM audit_events WHERE action = 'interval_version.superseded' AND entity_id = $1 AND details->>'supersededBy' = $2`, [oldId, newId]);
  const [{ n: messages }] = await q(`SELECT count(*)::int AS n FROM outbox WHERE kind = 'version.signed' AND entity_id = $1`, [newId]);
  return { inForce, newState, signatures, signedEvents, supersededEvents, messages };
}

async function waitForLockWait(timeoutMs: number): Promise<boolean> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const { rows } = await superuser!.query(`SELECT 1 FROM pg_stat_activity WHERE usename = 'bellwether_app' AND wait_event_type = 'Lock'`);
    if (rows.length > 0) return true;
    await sleep(20);
  }
  return false;
}

/** Waits until a backend of the app is inside a transaction writing what a sign-off writes. */
async function waitForSignOffWrite(timeoutMs: number): Promise<boolean> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const { rows } = await superuser!.query(
      `SELECT 1 FROM pg_stat_activity WHERE usename = 'bellwether_app' AND xact_start IS NOT NULL
         AND state IN ('active', 'idle in transaction') AND query ~* '^\\s*(insert into "signatures"|update "interval_versions"|insert into "audit_events")'`,
    );
    if (rows.length > 0) return true;
    await sleep(2);
  }
  return false;
}

/** A sign-off of an unknown version (404, nothing changed): loads the route in a freshly started app. */
async function warmSignRoute(cookies: Cookies): Promise<void> {
  await postJson(urlA, `/api/v1/interval-versions/${crypto.randomUUID()}/sign`, cookies.director, signBody, 60_000).catch(() => undefined);
}

async function scenarioKill(cookies: Cookies): Promise<void> {
  const code = "CA";
  say(`\n4. The app process killed (SIGKILL) in the middle of a sign-off of ${code}`);
  // One sign-off left to finish, to know how long one takes.
  const first = await draftAndSubmit(urlA, cookies, code, [gaussianPartition(null, 2.36, 0.09, 2)]);
  await warmSignRoute(cookies);
  const t0 = performance.now();
  const baseline = await postJson(urlA, `/api/v1/interval-versions/${first}/sign`, cookies.director, signBody);
  const signMs = performance.now() - t0;
  if (baseline.status !== 200) throw new Error(`the baseline sign-off answered ${baseline.status}: ${baseline.text.slice(0, 300)}`);
  figure(`an undisturbed sign-off takes ${fmt(signMs)} ms (password check included)`);

  type Trial = { label: string; lock?: "analyte" | "old version"; watch?: true; afterMs?: number };
  const trials: Trial[] = [
    { label: "held inside the transaction before its first write (analyte row locked)", lock: "analyte" },
    { label: "held inside the transaction after the signature's insert (old version row locked)", lock: "old version" },
    { label: "killed as soon as its transaction was seen writing (pg_stat_activity)", watch: true },
    { label: "killed as soon as its transaction was seen writing (pg_stat_activity), again", watch: true },
    ...[0.5, 0.75, 0.9, 1.0, 1.1].map((f) => ({ label: `killed ${fmt(signMs * f)} ms after the request was sent`, afterMs: signMs * f })),
  ];
  let mean = 2.37;
  for (const trial of trials) {
    mean += 0.01;
    const oldId = (await owner!.query<{ id: string }>(`SELECT v.id::text FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = $1 AND v.state = 'in_force'`, [code])).rows[0].id;
    const newId = await draftAndSubmit(urlA, cookies, code, [gaussianPartition(null, Number(mean.toFixed(2)), 0.09, 2)]);
    let blocker: PoolClient | null = null;
    if (trial.lock) {
      blocker = await owner!.connect();
      await blocker.query("BEGIN");
      if (trial.lock === "analyte") await blocker.query(`SELECT 1 FROM analytes WHERE code = $1 FOR UPDATE`, [code]);
      else await blocker.query(`SELECT 1 FROM interval_versions WHERE id = $1 FOR UPDATE`, [oldId]);
    }
    const request = postJson(urlA, `/api/v1/interval-versions/${newId}/sign`, cookies.director, signBody, 60_000).catch((err: unknown) => ({ status: 0, retryAfter: null, text: String(err) }));
    let held = true;
    if (trial.lock) held = await waitForLockWait(30_000);
    else if (trial.watch) held = await waitForSignOffWrite(30_000);
    else await sleep(trial.afterMs!);
    await killApp("A");
    if (blocker) {
      await blocker.query("ROLLBACK");
      blocker.release();
      // The killed app's backend finds its client gone when it next talks to it, and rolls back.
      const deadline = Date.now() + 10_000;
      while (Date.now() < deadline && (await superuser!.query(`SELECT 1 FROM pg_stat_activity WHERE usename = 'bellwether_app' AND state <> 'idle'`)).rows.length > 0) await sleep(50);
    }
    const answer = await request;
    await startApp("A");
    await warmSignRoute(cookies);
    const o = await outcomeOf(code, oldId, newId);
    const newInForce = o.inForce.length === 1 && o.inForce[0] === newId;
    const oldInForce = o.inForce.length === 1 && o.inForce[0] === oldId;
    const consistent = newInForce
      ? o.newState === "in_force" && o.signatures === 1 && o.signedEvents === 1 && o.supersededEvents === 1 && o.messages === 1
      : oldInForce && o.newState === "awaiting_signoff" && o.signatures === 0 && o.signedEvents === 0 && o.supersededEvents === 0 && o.messages === 0;
    const which = newInForce ? "the new version is in force" : oldInForce ? "the old version is still in force" : `${o.inForce.length} versions in force`;
    figure(`${trial.label}${held ? "" : " (the lock wait was not seen)"}: client got ${answer.status || "no answer"}; ${which}; new version ${o.newState}, ${o.signatures} signature(s), ${o.signedEvents} 'signed' and ${o.supersededEvents} 'superseded' audit events, ${o.messages} 'signed' message(s)`);
    check(
      (newInForce || oldInForce) && consistent,
      "exactly one version in force, and the audit trail, signatures and outbox agree with it",
      `after the kill: ${which}; state ${o.newState}, signatures ${o.signatures}, audit ${o.signedEvents}/${o.supersededEvents}, messages ${o.messages}`,
    );
    const res = await fetch(`${urlA}/api/v1/analytes/${code}/intervals`, { headers: { authorization: `Bearer ${lisKey}` } });
    const body = await res.text();
    const served = res.ok ? (JSON.parse(body) as { version?: { id?: string } }).version?.id : null;
    check(
      served === o.inForce[0],
      "after the restart the app serves the version in force",
      `after the restart GET /api/v1/analytes/${code}/intervals answered ${res.status}${res.ok ? ` with version ${served} while ${o.inForce[0]} is in force` : `: ${body.slice(0, 240)}`}`,
    );
  }
  await checkNoDuplicates();
}

// ---------------------------------------------------------------------------------------------

async function main(): Promise<void> {
  stopClustersUnder(dataRoot);
  fs.rmSync(dataRoot, { recursive: true, force: true });
  fs.mkdirSync(dataRoot, { recursive: true });
  database = await prepareDatabase({ dataRoot, pgPort, database: "bellwether_resilience", fresh: true });
  lifetime.signal.throwIfAborted();
  await prepareSchema(database);
  const seeded = await seedDemoIfEmpty(database.url, { lis: { key: lisKey, ratePerMinute: LIS_RATE_PER_MINUTE } });
  say(`bellwether: seeded the demo laboratory (${seeded.seconds.toFixed(1)} s)`);
  await buildIfNeeded(lifetime.signal);
  lifetime.signal.throwIfAborted();
  const mail = await prepareMail(dataRoot, {});
  mailFake = mail.fake;
  const secret = crypto.randomBytes(32).toString("base64url");
  envOf = (label) => appEnv(label === "A" ? urlA : urlB, secret, mail.env);
  owner = new Pool({ connectionString: database.migrationUrl!, max: 4 });
  owner.on("error", () => undefined);
  appPool = new Pool({ connectionString: database.url, max: 2 });
  appPool.on("error", () => undefined);
  superuser = new Pool({ connectionString: superuserUrl(database.server!, "bellwether_resilience"), max: 1 });
  superuser.on("error", () => undefined);
  await startApp("A");
  lifetime.signal.throwIfAborted();

  const cookies: Cookies = { scientist: await signIn(urlA, scientist.email, scientist.password), director: await signIn(urlA, director.email, director.password) };
  const connectionId = await lisConnectionId();
  say(`Bellwether resilience benchmark: ${os.cpus().length} cores, load average ${os.loadavg().map((l) => l.toFixed(1)).join(" ")}; app logs in ${path.relative(ROOT, dataRoot)}/`);

  if (SCENARIOS.has("load")) await scenarioLoad(connectionId);
  if (SCENARIOS.has("outage")) await scenarioOutage(connectionId, cookies);
  if (SCENARIOS.has("instances")) await scenarioTwoInstances(cookies);
  if (SCENARIOS.has("kill")) await scenarioKill(cookies);

  say("");
  if (problems.length === 0) say("Every check passed.");
  else {
    say(`${problems.length} check(s) found something wrong:`);
    for (const p of problems) say(`  - ${p}`);
  }
  if (os.loadavg()[0] > os.cpus().length) say("note: the machine was busy with other work (load above its core count): the figures are lower and noisier than on an idle machine.");
}

finished = main();
finished.then(
  () => exit(0, "done"),
  (err: unknown) => {
    if (lifetime.signal.aborted) return;
    say(`bellwether: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`, process.stderr);
    void exit(1, "error");
  },
);
