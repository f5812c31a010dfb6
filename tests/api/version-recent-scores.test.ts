import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL } from "../support/http-session";
import { donorCsv, generatedRows, openStudy, sender, signInAll, tableCounts, uploadAndCommit, type Cookies } from "../support/studies";

const { pool } = testDatabase();
afterAll(() => pool.end());

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

const CODE = `RS${Date.now().toString(36).toUpperCase()}`.slice(0, 16);
const TABLES = ["score_log", "interval_versions", "outbox", "audit_events"];
let cookies: Cookies;
let send: ReturnType<typeof sender>;
let studyId: string;
let analyteId: string;
/** v0: one "everyone" partition, left a draft (only its partition is logged against). v1: F and M, in force. v2: F and M, a draft. */
let v0: Doc;
let v1: Doc;
let v2: Doc;
const DAY = 86_400_000;

async function estimate(body: unknown): Promise<Doc> {
  const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", body);
  expect(res.status).toBe(201);
  return res.json();
}

async function draft(partitions: { estimate: string; method: string }[], extra: Doc = {}): Promise<Doc> {
  const res = await send("POST", "/api/v1/interval-versions", "scientist", { analyte: CODE, study: studyId, partitions, ...extra });
  expect(res.status, await res.clone().text()).toBe(201);
  return res.json();
}

/** Writes `count` de-identified log rows as the score log does: value, censoring, flag, partition, version, time, caller. */
async function log({
  partitionId,
  versionId,
  value,
  flag,
  count,
  censored = null,
  daysAgo = 1,
  analyte = analyteId,
}: {
  partitionId: string;
  versionId: string;
  value: number;
  flag: string;
  count: number;
  censored?: "<" | ">" | null;
  daysAgo?: number;
  analyte?: string;
}): Promise<void> {
  await pool.query(
    `INSERT INTO score_log (scored_at, analyte_id, version_id, partition_id, value, censored, flag, caller_kind, caller_id, channel)
     SELECT now() - make_interval(secs => $1::double precision), $2, $3, $4, $5, $6, $7, 'lis', $8, 'api' FROM generate_series(1, $9)`,
    [daysAgo * 86_400, analyte, versionId, partitionId, value, censored, flag, randomUUID(), count],
  );
}

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  const analyte = await send("POST", "/api/v1/analytes", "scientist", { code: CODE, name: "Recent scores analyte", unit: "mmol/L", decimals: 2 });
  expect(analyte.status).toBe(201);
  analyteId = (await pool.query("SELECT id FROM analytes WHERE code = $1", [CODE])).rows[0].id;
  studyId = await openStudy(send, "Recent scores study", "scientist", CODE);
  await uploadAndCommit(cookies, studyId, donorCsv(generatedRows(200, 43, "S")));
  const all = await estimate({ outliers: "none", seed: 2 });
  const women = await estimate({ partition: { sex: "F" }, outliers: "none", seed: 2 });
  const men = await estimate({ partition: { sex: "M" }, outliers: "none", seed: 2 });
  v0 = await draft([{ estimate: all.id, method: "nonparametric" }]);
  v1 = await draft([
    { estimate: women.id, method: "nonparametric" },
    { estimate: men.id, method: "nonparametric" },
  ]);
  v2 = await draft(
    [
      { estimate: women.id, method: "parametric" },
      { estimate: men.id, method: "parametric" },
    ],
    { criticalHigh: 100 },
  );
  expect((await send("POST", `/api/v1/interval-versions/${v1.id}/submit`, "scientist")).status).toBe(200);
  const director = demoUser("director");
  const signed = await send("POST", `/api/v1/interval-versions/${v1.id}/sign`, "director", { password: director.password, email: director.email, meaning: "approved_for_clinical_use" });
  expect(signed.status, await signed.clone().text()).toBe(200);

  const [f1, m1] = v1.partitions;
  const [f2, m2] = v2.partitions;
  const everyone = v0.partitions[0];
  // Logged against version 1 (F and M): each maps to version 2's partition of the same sex.
  await log({ partitionId: f1.id, versionId: v1.id, value: (f2.low + f2.high) / 2, flag: "N", count: 5 }); // N→N: unchanged
  await log({ partitionId: f1.id, versionId: v1.id, value: f2.low - 0.01, flag: "N", count: 3 }); // below the new low: N→L
  await log({ partitionId: m1.id, versionId: v1.id, value: m2.high + 0.01, flag: "N", count: 2 }); // above the new high: N→H
  await log({ partitionId: m1.id, versionId: v1.id, value: m2.high, flag: "H", count: 4 }); // on the new high (inclusive): H→N
  await log({ partitionId: m1.id, versionId: v1.id, value: m2.low - 0.01, censored: "<", flag: "<", count: 1 }); // "<c" with c below the new low: <→L
  await log({ partitionId: m1.id, versionId: v1.id, value: 150, flag: "H", count: 2 }); // beyond the new critical high 100: H→HH
  // An "everyone" partition maps to neither sex partition alone; an unknown partition to none.
  await log({ partitionId: everyone.id, versionId: v0.id, value: 1, flag: "L", count: 6 });
  await log({ partitionId: randomUUID(), versionId: v0.id, value: 1, flag: "L", count: 1 });
  // Outside the window, and another analyte's: not counted.
  await log({ partitionId: f1.id, versionId: v1.id, value: f2.low - 0.01, flag: "N", count: 10, daysAgo: 91 });
  await log({ partitionId: f1.id, versionId: v1.id, value: f2.low - 0.01, flag: "N", count: 10, analyte: randomUUID() });
}, 120_000);

describe("GET /api/v1/interval-versions/{id}/comparison: recentScores", () => {
  it("re-flags the last 90 days' logged scores against the draft's partitions, by transition", async () => {
    const before = await tableCounts(pool, TABLES);
    const res = await send("GET", `/api/v1/interval-versions/${v2.id}/comparison`, "director");
    expect(res.status).toBe(200);
    const { recentScores } = await res.json();
    // Expected by hand from the rows written above (DESIGN.md's flag rule: L below the lower
    // limit, H above the upper, N within, limits inclusive; HH strictly above the critical high;
    // "<c" is L when c is at or below the lower limit).
    expect(recentScores).toEqual({
      days: 90,
      since: expect.stringMatching(/^\d{4}-\d{2}-\d{2}T/),
      total: 8 + 9 + 7,
      changed: 3 + 2 + 4 + 1 + 2,
      unmapped: 7,
      transitions: { "<→L": 1, "N→L": 3, "N→H": 2, "H→N": 4, "H→HH": 2 },
      byPartition: [
        { partition: { sex: "F", ageFromDays: null, ageToDays: null, label: "F" }, total: 8, changed: 3, transitions: { "N→L": 3 } },
        { partition: { sex: "M", ageFromDays: null, ageToDays: null, label: "M" }, total: 9, changed: 9, transitions: { "<→L": 1, "N→H": 2, "H→N": 4, "H→HH": 2 } },
      ],
      unmappedPartitions: [
        { partition: { sex: null, ageFromDays: null, ageToDays: null, label: "All donors" }, count: 6 },
        { partition: null, count: 1 },
      ],
    });
    expect(Date.now() - Date.parse(recentScores.since)).toBeGreaterThanOrEqual(90 * DAY);
    expect(await tableCounts(pool, TABLES)).toEqual(before);
  });

  it("shows the figures on the review page in a plain sentence", async () => {
    const res = await fetch(`${BASE_URL}/versions/${v2.id}`, { headers: { cookie: cookies.director } });
    expect(res.status).toBe(200);
    const html = (await res.text()).replace(/<!-- -->/g, "");
    expect(html).toContain("Of 24 scores in the last 90 days, 12 would change flag: 3 normal → low, 2 normal → high, 4 high → normal, 2 high → critical high, 1 below the measuring range → low.");
    expect(html).toContain("7 scores were made in partitions that no single partition of this version covers and are not re-flagged.");
  });

  it("is for directors and scientists only, like the rest of the comparison", async () => {
    for (const role of ["admin", "clinician"] as const) {
      expect((await send("GET", `/api/v1/interval-versions/${v2.id}/comparison`, role)).status).toBe(403);
    }
  });
});
