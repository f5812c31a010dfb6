import type { ChildProcess } from "node:child_process";
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { serveApp, stopApp } from "@/scripts/lib/app-stack";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL } from "../support/http-session";
import { createAnalyte, putInForce, uniqueCode, waitFor } from "../support/scores";
import { demoLisKey } from "../support/lis";
import { signInAll, type Cookies } from "../support/studies";
import { startTcpProxy, type TcpProxy } from "../support/tcp-proxy";

/**
 * Scale-out (the scoring issue): two app instances on one database. Each keeps the intervals in
 * force in memory; a version signed through one instance reaches both through LISTEN/NOTIFY, and
 * an instance whose listening connection comes back reloads everything, since the notifications
 * sent while it was away are lost. The second instance reaches PostgreSQL through a TCP relay
 * that the test can cut, to see what it does while the database is away.
 */
const { pool } = testDatabase();
const DATABASE_URL = process.env.DATABASE_URL as string;
const SECOND_PORT = Number(process.env.BELLWETHER_TEST_SPARE_PORT ?? 3110) + 1;
const SECOND_URL = `http://127.0.0.1:${SECOND_PORT}`;
const CODE = uniqueCode("SO");

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

let cookies: Cookies;
let second: ChildProcess | null = null;
let relay: TcpProxy;

const partition = (low: number, high: number) => ({
  low,
  high,
  method: "parametric" as const,
  n: 120,
  model: { kind: "gaussian", transform: "none", mean: (low + high) / 2, sd: (high - low) / (2 * 1.959964) },
});

function intervals(base: string): Promise<Response> {
  return fetch(`${base}/api/v1/analytes/${CODE}/intervals`, { headers: { cookie: cookies.clinician } });
}

function score(base: string, value: number): Promise<Response> {
  return fetch(`${base}/api/v1/scores`, {
    method: "POST",
    headers: { cookie: cookies.clinician, "content-type": "application/json" },
    body: JSON.stringify({ items: [{ analyte: CODE, value }] }),
  });
}

async function versionIdAt(base: string): Promise<string | null> {
  const res = await intervals(base);
  if (res.status !== 200) return "unavailable";
  return ((await res.json()) as Doc).version?.id ?? null;
}

/** Polls both instances until each serves `versionId`; returns the milliseconds it took. */
async function bothServe(versionId: string | null): Promise<number> {
  const ms = await waitFor(async () => (await versionIdAt(BASE_URL)) === versionId && (await versionIdAt(SECOND_URL)) === versionId, 10_000, 25);
  // Reported, not asserted (no timed assertions): the issue asks for "within a second".
  console.info(`both instances served ${versionId ?? "no version"} ${ms} ms after the change was answered`);
  return ms;
}

beforeAll(async () => {
  cookies = await signInAll();
  await createAnalyte(cookies, { code: CODE, name: `Scale-out ${CODE}`, unit: "mmol/L", decimals: 2 });
  const target = new URL(DATABASE_URL);
  relay = await startTcpProxy({ host: target.hostname, port: Number(target.port) });
  const env: NodeJS.ProcessEnv = {
    ...process.env,
    NODE_ENV: "production",
    DATABASE_URL: relay.url(DATABASE_URL),
    NEXTAUTH_URL: SECOND_URL,
    BELLWETHER_DEMO: "1",
    BELLWETHER_TRUSTED_PROXIES: "127.0.0.1",
    BELLWETHER_MAIL_INTERVAL_SECONDS: "3600",
  };
  delete env.BELLWETHER_MIGRATION_URL;
  second = await serveApp({ port: SECOND_PORT, env, quiet: true });
}, 120_000);

afterAll(async () => {
  await stopApp(second);
  await relay?.close();
  await pool.end();
});

describe("two instances on one database", () => {
  it("both serve a version signed through the API, and the next one, once notified", async () => {
    // Both instances hold the analyte, with nothing in force, before the signature.
    expect(await versionIdAt(BASE_URL)).toBeNull();
    expect(await versionIdAt(SECOND_URL)).toBeNull();

    const first = await putInForce(pool, cookies, CODE, [partition(3.5, 5.1)]);
    await bothServe(first);
    for (const base of [BASE_URL, SECOND_URL]) {
      const body = (await (await score(base, 5.3)).json()) as Doc;
      expect(body.results[0]).toMatchObject({ flag: "H", interval: { low: 3.5, high: 5.1, version: 1, versionId: first } });
    }

    const next = await putInForce(pool, cookies, CODE, [partition(3.4, 5.4)]);
    await bothServe(next);
    for (const base of [BASE_URL, SECOND_URL]) {
      const body = (await (await score(base, 5.3)).json()) as Doc;
      expect(body.results[0]).toMatchObject({ flag: "N", interval: { low: 3.4, high: 5.4, version: 2, versionId: next } });
    }
  });

  it("both stop scoring against a withdrawn version", async () => {
    const current = await versionIdAt(BASE_URL);
    const director = demoUser("director");
    const res = await fetch(`${BASE_URL}/api/v1/interval-versions/${current}/withdraw`, {
      method: "POST",
      headers: { cookie: cookies.director, "content-type": "application/json" },
      body: JSON.stringify({ password: director.password, email: director.email, reason: "Scale-out test: calibration fault." }),
    });
    expect(res.status, await res.clone().text()).toBe(200);
    await bothServe(null);
    for (const base of [BASE_URL, SECOND_URL]) {
      const body = (await (await score(base, 4.2)).json()) as Doc;
      expect(body.results[0].error.title).toBe("No interval in force");
    }
  });
});

describe("while the database is away from one instance", () => {
  it("scores for an LIS key from the cache, answers what needs the database 503, and reloads everything when it returns", async () => {
    const before = await putInForce(pool, cookies, CODE, [partition(3.5, 5.1)]);
    await bothServe(before);
    // A value of our own, to find its log entry afterwards.
    const value = 5.1 + Math.floor(Math.random() * 1e6) / 1e8;
    relay.down();

    // An LIS key needs no database (keys and models are held in memory): scored from the cache.
    const keyed = await fetch(`${SECOND_URL}/api/v1/scores`, {
      method: "POST",
      headers: { authorization: `Bearer ${demoLisKey()}`, "content-type": "application/json" },
      body: JSON.stringify({ items: [{ analyte: CODE, value }] }),
    });
    const keyedBody = (await keyed.json()) as Doc;
    expect(keyed.status, JSON.stringify(keyedBody)).toBe(200);
    expect(keyedBody.results[0]).toMatchObject({ flag: "H", interval: { versionId: before } });
    const keyedIntervals = await fetch(`${SECOND_URL}/api/v1/analytes/${CODE}/intervals`, { headers: { authorization: `Bearer ${demoLisKey()}` } });
    expect(keyedIntervals.status).toBe(200);
    expect(((await keyedIntervals.json()) as Doc).version.id).toBe(before);

    // A session is read from the database: 503 with Retry-After.
    const refused = await score(SECOND_URL, 4.2);
    expect(refused.status).toBe(503);
    expect(refused.headers.get("retry-after")).toBe("5");
    expect(refused.headers.get("content-type")).toBe("application/problem+json");
    expect(((await refused.json()) as Doc).detail).toBe("The database cannot be reached just now; nothing was changed. Try again in 5 seconds.");

    // Signed meanwhile through the first instance: the second misses the notification.
    const signedWhileAway = await putInForce(pool, cookies, CODE, [partition(3.3, 5.2)]);
    await waitFor(async () => (await versionIdAt(BASE_URL)) === signedWhileAway);
    relay.up();
    // Its listening connection comes back (within its back-off of at most 5 s) and reloads.
    await bothServe(signedWhileAway);
    const body = (await (await score(SECOND_URL, 5.25)).json()) as Doc;
    expect(body.results[0]).toMatchObject({ flag: "H", interval: { low: 3.3, high: 5.2, versionId: signedWhileAway } });

    // The entry kept while the database was away is written once it is back.
    const logged = async () =>
      (await pool.query("SELECT version_id, flag, caller_kind, channel FROM score_log WHERE analyte_id = (SELECT id FROM analytes WHERE code = $1) AND value = $2", [CODE, value])).rows;
    await waitFor(async () => (await logged()).length === 1, 10_000, 200);
    expect(await logged()).toEqual([{ version_id: before, flag: "H", caller_kind: "lis", channel: "api" }]);
  });
});

describe("shutdown", () => {
  it("writes the score log's last entries before the instance exits", async () => {
    const value = 4.2 + Math.floor(Math.random() * 1e6) / 1e8;
    const res = await fetch(`${SECOND_URL}/api/v1/scores`, {
      method: "POST",
      headers: { authorization: `Bearer ${demoLisKey()}`, "content-type": "application/json" },
      body: JSON.stringify({ items: [{ analyte: CODE, value }] }),
    });
    expect(res.status).toBe(200);
    // SIGTERM at once: the entry is written by the flush at shutdown if the timer has not yet.
    await stopApp(second);
    second = null;
    const { rows } = await pool.query("SELECT flag, channel FROM score_log WHERE analyte_id = (SELECT id FROM analytes WHERE code = $1) AND value = $2", [CODE, value]);
    expect(rows).toEqual([{ flag: "N", channel: "api" }]);
  });
});

describe("the score service while the database is away (in this process)", () => {
  it("goes on scoring from the cache and writes the log entries when the database returns", async () => {
    // This process's own copy of the service, connected through a relay of its own.
    const local = await startTcpProxy({ host: new URL(DATABASE_URL).hostname, port: Number(new URL(DATABASE_URL).port) });
    process.env.DATABASE_URL = local.url(DATABASE_URL);
    const { scoreItems } = await import("@/lib/scores/score-items");
    const { flushScoreLog, scoreLogStatus, stopScoreLog } = await import("@/lib/scores/score-log");
    const { stopListening } = await import("@/db/listen");
    const { closeDb } = await import("@/db/client");
    const principal = { kind: "user" as const, id: randomUUID(), role: "clinician" as const };
    try {
      const before = await scoreItems({ items: [{ analyte: CODE, value: 4.2 }], principal, channel: "app" });
      expect(before.results[0]).toMatchObject({ flag: "N" });
      await flushScoreLog({ all: true });

      local.down();
      const during = await scoreItems({ items: [{ analyte: CODE, value: 5.25 }, { analyte: CODE, value: 3.2 }], principal, channel: "app" });
      expect(during.results.map((r) => ("flag" in r ? r.flag : r.error.title))).toEqual(["H", "L"]);
      await flushScoreLog({ all: true });
      expect(scoreLogStatus().buffered).toBe(2);

      local.up();
      await flushScoreLog({ all: true });
      expect(scoreLogStatus().buffered).toBe(0);
      const { rows } = await pool.query("SELECT value, flag FROM score_log WHERE caller_id = $1 ORDER BY value", [principal.id]);
      expect(rows).toEqual([
        { value: 3.2, flag: "L" },
        { value: 4.2, flag: "N" },
        { value: 5.25, flag: "H" },
      ]);
    } finally {
      await stopScoreLog();
      await stopListening();
      await closeDb();
      process.env.DATABASE_URL = DATABASE_URL;
      await local.close();
    }
  });
});
