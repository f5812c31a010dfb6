import normal from "@stdlib/stats-base-dists-normal";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL } from "../support/http-session";
import { demoLisKey, fetchWithKey } from "../support/lis";
import { createAnalyte, putInForce, uniqueCode, waitFor } from "../support/scores";
import { signInAll, tableCounts, type Cookies } from "../support/studies";

const { pool } = testDatabase();
afterAll(() => pool.end());

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/** DESIGN.md's roles table written out: every signed-in role may read in-force intervals and score. */
const MAY_SCORE: Record<Role, boolean> = { admin: true, director: true, scientist: true, clinician: true };
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];

let cookies: Cookies;
/** Albumin, RI 35-52 g/L, scored by zlog (METHODS.md §10.1). */
const ALB = uniqueCode("ALB");
/** The Box-Cox example of METHODS.md §2.2 (λ = −0.30300 on 2.1 … 14.2). */
const BC = uniqueCode("BC");
/** An analyte with no version in force. */
const NONE = uniqueCode("NV");
let bcVersionId: string;

// METHODS.md §2.2's second data set and λ̂; the gaussian on the Box-Cox scale is its mean and SD
// (n − 1), computed here with §2.1's formulas rather than by Bellwether.
const BC_DATA = [2.1, 2.9, 3.2, 3.8, 4.4, 5.0, 5.9, 7.3, 9.6, 14.2];
const BC_LAMBDA = -0.303;
const bcY = BC_DATA.map((x) => (x ** BC_LAMBDA - 1) / BC_LAMBDA);
const BC_MEAN = bcY.reduce((a, b) => a + b, 0) / bcY.length;
const BC_SD = Math.sqrt(bcY.reduce((a, b) => a + (b - BC_MEAN) ** 2, 0) / (bcY.length - 1));

function score(items: unknown[], role: Role | null = "clinician", init: RequestInit = {}): Promise<Response> {
  const headers: Record<string, string> = { "content-type": "application/json" };
  if (role) headers.cookie = cookies[role];
  return fetch(`${BASE_URL}/api/v1/scores`, { method: "POST", headers, body: JSON.stringify({ items }), ...init });
}

async function scored(items: unknown[], role: Role = "clinician"): Promise<Doc> {
  const res = await score(items, role);
  const body = await res.json();
  expect(res.status, JSON.stringify(body)).toBe(200);
  return body;
}

const intervals = (code: string, role: Role | null = "clinician") =>
  fetch(`${BASE_URL}/api/v1/analytes/${encodeURIComponent(code)}/intervals`, { headers: role ? { cookie: cookies[role] } : {} });

async function problem(res: Response): Promise<{ status: number; detail: string }> {
  expect(res.headers.get("content-type")).toBe("application/problem+json");
  return { status: res.status, detail: (await res.json()).detail };
}

/** The score log's row count once what earlier requests buffered has been written (the flush runs every second). */
async function settledLogCount(): Promise<number> {
  await new Promise((r) => setTimeout(r, 1500));
  return (await tableCounts(pool, ["score_log"])).score_log;
}

beforeAll(async () => {
  cookies = await signInAll();
  await createAnalyte(cookies, { code: ALB, name: `Albumin ${ALB}`, unit: "g/L", decimals: 0 });
  await createAnalyte(cookies, { code: BC, name: `Box-Cox example ${BC}`, unit: "mmol/L", decimals: 2 });
  await createAnalyte(cookies, { code: NONE, name: `Never signed ${NONE}`, unit: "mmol/L", decimals: 1 });
  await putInForce(pool, cookies, ALB, [{ low: 35, high: 52, method: "adopted", n: 20, model: { kind: "zlog", scale: "log" } }]);
  bcVersionId = await putInForce(pool, cookies, BC, [
    // The limits as METHODS.md §2.2 publishes them (4 decimals).
    { low: 1.8388, high: 18.3289, method: "parametric", n: 10, model: { kind: "gaussian", transform: "box-cox", lambda: BC_LAMBDA, mean: BC_MEAN, sd: BC_SD } },
  ]);
  // The served app learns of the signatures through LISTEN/NOTIFY.
  for (const code of [ALB, BC]) await waitFor(async () => (await (await intervals(code)).json()).version !== null);
}, 120_000);

describe("POST /api/v1/scores: who may score", () => {
  for (const role of ROLES) {
    it(`${MAY_SCORE[role] ? "lets" : "refuses"} the ${role}`, async () => {
      const res = await score([{ analyte: "K", value: 4.2 }], role);
      expect(res.status).toBe(MAY_SCORE[role] ? 200 : 403);
    });
  }

  it("lets an LIS key score (DESIGN.md: LIS keys may score), logged as the connection on the api channel", async () => {
    const res = await fetchWithKey(demoLisKey(), "/api/v1/scores", { method: "POST", body: { items: [{ analyte: ALB, value: 44.4 }] } });
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(200);
    expect(body.results[0]).toMatchObject({ value: 44.4, flag: "N" });
    const connection = (await pool.query("SELECT id FROM lis_connections WHERE key_sha256 = encode(sha256(convert_to($1, 'UTF8')), 'hex')", [demoLisKey()])).rows[0].id;
    const partitionId = body.results[0].interval.partitionId;
    const logged = async () => (await pool.query("SELECT caller_kind, caller_id, channel FROM score_log WHERE partition_id = $1 AND value = 44.4", [partitionId])).rows;
    await waitFor(async () => (await logged()).length === 1, 5000, 200);
    expect(await logged()).toEqual([{ caller_kind: "lis", caller_id: connection, channel: "api" }]);
  });

  it("answers an anonymous caller 401 and logs nothing", async () => {
    const before = await settledLogCount();
    expect(await problem(await score([{ analyte: "K", value: 4.2 }], null))).toEqual({ status: 401, detail: "Sign in to continue." });
    expect(await settledLogCount()).toBe(before);
  });
});

describe("POST /api/v1/scores: published check values", () => {
  // METHODS.md §10.1, albumin RI 35-52 g/L (Hoffmann et al., J Lab Med 2017;41:23-32; [COMPUTED]):
  // x, zlog, percentile as printed (percentiles to 2 decimals; 27 g/L's 0.0003 to 4).
  const table: [number, number, number, number][] = [
    [42, -0.1547, 43.85, 2],
    [34, -2.247, 1.23, 2],
    [38, -1.1457, 12.6, 2],
    [43, 0.0783, 53.12, 2],
    [50, 1.5717, 94.2, 2],
    [27, -4.5296, 0.0003, 4],
    [31, -3.1617, 0.08, 2],
  ];
  it("scores albumin by zlog as METHODS.md §10.1's table", async () => {
    const body = await scored(table.map(([x]) => ({ analyte: ALB, value: x, unit: "g/L" })));
    for (const [i, [x, z, p, digits]] of table.entries()) {
      const r = body.results[i];
      // The table prints 4 decimals of z: within half a unit of the last.
      expect(Math.abs(r.z - z), `x = ${x}`).toBeLessThan(0.00005 + 1e-9);
      expect(r.percentile, `x = ${x}`).toBeCloseTo(p, digits);
      expect(r.flag).toBe(x < 35 ? "L" : x > 52 ? "H" : "N");
      expect(r.model).toEqual({ kind: "zlog", scale: "log" });
      expect(r.cautions).toEqual(["general", "limits-only"]);
    }
    // 24 g/L: "~0" in the table; z = −5.6958.
    const [far] = (await scored([{ analyte: ALB, value: 24 }])).results;
    expect(far.z).toBeCloseTo(-5.6958, 4);
    expect(far.percentile).toBeLessThan(0.00005);
  });

  it("scores the Box-Cox example of METHODS.md §2.2: 12 gives z = 1.4270, the 92.3rd percentile", async () => {
    const body = await scored([
      { analyte: BC, value: 12, ref: "twelve" },
      { analyte: BC, value: 1.8388 },
      { analyte: BC, value: 18.3289 },
      { analyte: BC, value: 20 },
    ]);
    const [twelve, low, high, above] = body.results;
    expect(twelve).toMatchObject({ ref: "twelve", value: 12, censored: null, flag: "N", ageYearsUsed: null });
    expect(twelve.z).toBeCloseTo(1.427, 4); // METHODS.md §2.2 / §13 row 9
    expect(twelve.percentile).toBeCloseTo(92.3, 1); // METHODS.md §2.2: "the 92.3rd percentile"
    // The published limits sit at z = ∓1.959964 (METHODS.md §2.1), to the 4 decimals they are printed with.
    expect(low.z).toBeCloseTo(-1.959964, 3);
    expect(high.z).toBeCloseTo(1.959964, 3);
    expect(above.flag).toBe("H");
    expect(twelve.model).toEqual({ kind: "gaussian", transform: "box-cox", lambda: BC_LAMBDA, mean: BC_MEAN, sd: BC_SD });
    expect(twelve.interval).toMatchObject({ low: 1.8388, high: 18.3289, unit: "mmol/L", decimals: 2, version: 1, versionId: bcVersionId, method: "parametric", n: 10, partition: {} });
    expect(twelve.hl7).toEqual({ obx7: "1.84-18.33", obx8: "N" });
  });

  it("gives percentile = 100·Φ(z) with Φ from @stdlib, and z = (x − mean)/sd for a raw-scale gaussian (demo calcium)", async () => {
    const values = [1.9, 2.1, 2.35, 2.6, 2.9];
    const body = await scored(values.map((value) => ({ analyte: "CA", value })));
    for (const [i, x] of values.entries()) {
      const r = body.results[i];
      expect(r.model.kind).toBe("gaussian");
      // @stdlib/stats-base-dists-normal: normal.cdf(z, 0, 1), the reference Φ.
      expect(r.percentile).toBeCloseTo(100 * normal.cdf(r.z, 0, 1), 10);
      if (r.model.transform === "none") expect(r.z).toBeCloseTo((x - r.model.mean) / r.model.sd, 10);
      else if (r.model.transform === "ln") expect(r.z).toBeCloseTo((Math.log(x) - r.model.mean) / r.model.sd, 10);
    }
  });
});

describe("POST /api/v1/scores: items", () => {
  it("scores a batch in order, each bad item answered in its place", async () => {
    const body = await scored([
      { analyte: "K", value: 4.2, ref: "a" },
      { analyte: "NOPE", value: 1, ref: "b" },
      { analyte: "K", ref: "c" },
      { analyte: NONE, value: 3, ref: "d" },
      { analyte: "HGB", value: 140, ref: "e" },
      { analyte: "K", value: "about 4", ref: "f" },
      { analyte: "GLU", value: 5, unit: "U/L", ref: "g" },
      { analyte: "K", value: 4.2, unit: "mmol/l/x", ref: "h" },
      { loinc: "2823-3", value: 4.2, ref: "i" },
      "not an object",
      { analyte: "K", value: 4.2, birthDate: "1971-06-14", ref: "k" },
      { analyte: "HGB", value: 140, sex: "F", birthDate: "2026-01-02", collectedAt: "2025-12-31", ref: "l" },
      { analyte: "K", value: 4.2, loinc: "718-7", ref: "m" },
    ]);
    const r = body.results;
    expect(r).toHaveLength(13);
    expect(r[0]).toMatchObject({ ref: "a", analyte: { code: "K", name: "Potassium", loinc: "2823-3" }, flag: "N" });
    expect(r[1]).toEqual({ ref: "b", error: { type: "urn:bellwether:problem:not_found", title: "Unknown analyte", detail: "There is no analyte with the code NOPE." } });
    expect(r[2]).toEqual({ ref: "c", error: { type: "urn:bellwether:problem:invalid", title: "Invalid item", detail: "value: Invalid input" } });
    expect(r[3]).toEqual({
      ref: "d",
      error: {
        type: "urn:bellwether:problem:no_interval_in_force",
        title: "No interval in force",
        detail: `There is no interval in force for ${NONE} (Never signed ${NONE}): none has been signed off, or the one in force was withdrawn.`,
      },
    });
    expect(r[4]).toEqual({
      ref: "e",
      error: {
        type: "urn:bellwether:problem:no_partition",
        title: "No partition applies",
        detail: "The interval in force for HGB (version 1) is partitioned by sex and has no partition for both sexes: give sex (F or M).",
      },
    });
    expect(r[5].error).toEqual({ type: "urn:bellwether:problem:invalid", title: "Invalid item", detail: 'value "about 4" is neither a number nor a censored result such as "<0.5" or ">1000".' });
    expect(r[6].error).toEqual({ type: "urn:bellwether:problem:unit_not_convertible", title: "Unit not convertible", detail: "U/L cannot be converted to mmol/L: they measure different kinds of quantity." });
    expect(r[7].error.type).toBe("urn:bellwether:problem:unit_not_convertible");
    expect(r[7].error.detail).toMatch(/^"mmol\/l\/x" is not a UCUM unit\./);
    expect(r[8]).toMatchObject({ ref: "i", analyte: { code: "K" }, value: 4.2 });
    expect(r[9]).toEqual({ error: { type: "urn:bellwether:problem:invalid", title: "Invalid item", detail: "(root): Invalid input: expected object, received string" } });
    expect(r[10]).toEqual({ ref: "k", error: { type: "urn:bellwether:problem:invalid", title: "Invalid item", detail: "birthDate: birthDate and collectedAt go together" } });
    expect(r[11]).toEqual({ ref: "l", error: { type: "urn:bellwether:problem:invalid", title: "Invalid item", detail: "birthDate 2026-01-02 is after collectedAt 2025-12-31." } });
    expect(r[12].error.detail).toBe("The analyte K has the LOINC code 2823-3, not 718-7: send one of the two, or both matching.");
  });

  it("writes the answer as JSON.stringify would (the route assembles shared parts once)", async () => {
    const res = await score([
      { analyte: "K", value: "<2.0", ref: 'quote " and \\ backslash' },
      { analyte: "GLU", value: 100, unit: "mg/dL", sex: "F", ageYears: 44.5 },
      { analyte: "NOPE", value: 1 },
      { analyte: BC, value: 12 },
      { analyte: ALB, value: 24 },
      { analyte: "HGB", value: 250, sex: "M", birthDate: "1971-06-14", collectedAt: "2026-03-02" },
    ]);
    const text = await res.text();
    expect(text).toBe(JSON.stringify(JSON.parse(text)));
    expect(res.headers.get("content-type")).toBe("application/json");
  });

  it("converts units with UCUM and the analyte's molar mass (METHODS.md §13 row 16)", async () => {
    const body = await scored([
      { analyte: "GLU", value: 100, unit: "mg/dL" },
      { analyte: "CREA", value: 1.0, unit: "mg/dL", sex: "M" },
      { analyte: "K", value: 4.2, unit: "mmol/L" },
    ]);
    const [glu, crea, k] = body.results;
    // Glucose 100 mg/dL → 5.551 mmol/L; creatinine 1.0 mg/dL → 88.4 µmol/L (METHODS.md §11/§13;
    // STACK.md: ucum-lhc gives 5.5507 with 180.156 g/mol).
    expect(glu.value).toBeCloseTo(5.5507, 4);
    expect(crea.value).toBeCloseTo(88.4, 1);
    expect(glu.cautions).toContain("unit-converted");
    expect(crea.cautions).toContain("unit-converted");
    // The interval's own unit is no conversion.
    expect(k.cautions).not.toContain("unit-converted");
    expect(k.value).toBe(4.2);
  });

  it("reads censored values: the flag and the percentile bound follow the side", async () => {
    const body = await scored([
      { analyte: "K", value: "<2.0" },
      { analyte: "K", value: "> 9" },
      { analyte: "K", value: "<=4.2" },
      { analyte: "K", value: "4.2" },
    ]);
    const [below, above, inside, text] = body.results;
    // K: critical limits 2.8 and 6.2 mmol/L in the demo; "<2.0" is below the critical low, ">9" above the critical high.
    expect(below).toMatchObject({ value: 2, censored: "<", flag: "LL", percentileBound: "below" });
    expect(above).toMatchObject({ value: 9, censored: ">", flag: "HH", percentileBound: "above" });
    // "<4.2" inside the interval: the true value may lie on either side of the low limit (HL7 Table 0078 "<").
    expect(inside).toMatchObject({ value: 4.2, censored: "<", flag: "<", percentileBound: "below" });
    expect(text).toMatchObject({ value: 4.2, censored: null, flag: "N" });
    expect(text.percentileBound).toBeUndefined();
    for (const r of [below, above, inside]) expect(r.cautions).toContain("value-censored");
    expect(body.cautionTexts["value-censored"]).toBeDefined();
  });

  it("chooses the partition by sex and age; birthDate + collectedAt win over ageYears", async () => {
    const body = await scored([
      { analyte: "HGB", value: 140, sex: "female", ageYears: 30 },
      { analyte: "HGB", value: 140, sex: "M", ageYears: 3, birthDate: "1971-06-14", collectedAt: "2026-03-02T08:15:00Z" },
    ]);
    const [f, m] = body.results;
    expect(f.interval.partition).toEqual({ sex: "F" });
    expect(m.interval.partition).toEqual({ sex: "M" });
    expect(f.ageYearsUsed).toBe(30);
    // 54 birthdays passed, then 261 of the 365 days from 2025-06-14 to 2026-06-14 (common practice:
    // completed years plus the fraction of the current year of age).
    expect(m.ageYearsUsed).toBeCloseTo(54 + 261 / 365, 12);
    expect(f.cautions).toContain("partition-chosen");
  });

  it("explains each caution code once, in the same words whatever the value", async () => {
    const a = await scored([{ analyte: "K", value: 3.9 }]);
    const b = await scored([{ analyte: "K", value: 5.0 }, { analyte: ALB, value: 40 }]);
    expect(Object.keys(a.cautionTexts)).toEqual(["general"]);
    expect(Object.keys(b.cautionTexts).sort()).toEqual(["general", "limits-only"]);
    expect(b.cautionTexts.general).toBe(a.cautionTexts.general);
    expect(a.cautionTexts.general).toMatch(/^This z-score and percentile place the value among healthy reference individuals; they are not a diagnosis\./);
  });

  it("adds the review-overdue caution once the version's review date has passed", async () => {
    await pool.query("UPDATE interval_versions SET review_by = now() - interval '1 day' WHERE id = $1", [bcVersionId]);
    await waitFor(async () => (await scored([{ analyte: BC, value: 5 }])).results[0].cautions.includes("review-overdue"));
    const body = await scored([{ analyte: BC, value: 5 }]);
    expect(body.cautionTexts["review-overdue"]).toBe(
      "This reference interval is past its scheduled review date: the laboratory has not yet re-confirmed that it still fits the current method and population.",
    );
  });
});

describe("POST /api/v1/scores: limits", () => {
  it("scores 10,000 items in one request", async () => {
    const items = Array.from({ length: 10_000 }, (_, i) => ({ analyte: "K", value: 3 + (i % 30) / 10, sex: i % 2 ? "F" : "M", birthDate: "1971-06-14", collectedAt: "2026-03-02T08:15:00Z", ref: `r${i}` }));
    const body = await scored(items);
    expect(body.results).toHaveLength(10_000);
    expect(body.results[9_999]).toMatchObject({ ref: "r9999", value: 3 + 9_999 % 30 / 10 });
  });

  it("refuses 10,001 items whole with 413 and logs nothing", async () => {
    const before = await settledLogCount();
    const items = Array.from({ length: 10_001 }, () => ({ analyte: "K", value: 4.2 }));
    expect(await problem(await score(items))).toEqual({
      status: 413,
      detail: "A request may carry at most 10000 items; this one has 10001. Send them in several requests.",
    });
    expect(await settledLogCount()).toBe(before);
  });

  it("refuses a body over the size limit with 413, an empty list and a wrong body with 4xx", async () => {
    const big = JSON.stringify({ items: [{ analyte: "K", value: 4.2, ref: "x".repeat(64) }], pad: "y".repeat(4 * 1024 * 1024) });
    const headers = { "content-type": "application/json", cookie: cookies.clinician };
    expect(await problem(await fetch(`${BASE_URL}/api/v1/scores`, { method: "POST", headers, body: big }))).toEqual({
      status: 413,
      detail: `The request body is larger than ${4 * 1024 * 1024} bytes.`,
    });
    expect(await problem(await score([]))).toEqual({ status: 422, detail: "items: send at least one item" });
    expect((await problem(await fetch(`${BASE_URL}/api/v1/scores`, { method: "POST", headers, body: "{items" }))).status).toBe(400);
    expect((await problem(await fetch(`${BASE_URL}/api/v1/scores`, { method: "POST", headers: { cookie: cookies.clinician }, body: "x" }))).status).toBe(415);
  });
});

describe("the score log", () => {
  it("records each score de-identified: analyte, version, partition, value as scored, flag, caller and channel", async () => {
    const clinician = (await pool.query("SELECT id FROM users WHERE email = $1", [demoUser("clinician").email])).rows[0].id;
    const ref = await scored([{ analyte: ALB, value: 3.1, unit: "g/dL" }]);
    const result = ref.results[0];
    expect(result.value).toBeCloseTo(31, 10); // 3.1 g/dL = 31 g/L
    const where = "WHERE l.partition_id = $1 AND l.value = $2";
    const args = [result.interval.partitionId, result.value];
    await waitFor(async () => (await pool.query(`SELECT 1 FROM score_log l ${where}`, args)).rowCount === 1, 5000, 200);
    const { rows } = await pool.query(
      `SELECT a.code, l.version_id, l.value, l.censored, l.flag, l.z, l.percentile, l.caller_kind, l.caller_id, l.channel FROM score_log l JOIN analytes a ON a.id = l.analyte_id ${where}`,
      args,
    );
    expect(rows).toEqual([
      { code: ALB, version_id: result.interval.versionId, value: result.value, censored: null, flag: "L", z: result.z, percentile: result.percentile, caller_kind: "user", caller_id: clinician, channel: "app" },
    ]);
  });
});

describe("GET /api/v1/analytes/{code}/intervals", () => {
  for (const role of ROLES) {
    it(`${MAY_SCORE[role] ? "lets" : "refuses"} the ${role} read them`, async () => {
      expect((await intervals("K", role)).status).toBe(MAY_SCORE[role] ? 200 : 403);
    });
  }

  it("answers an anonymous caller 401, and an LIS key 200 (DESIGN.md: LIS keys read in-force intervals)", async () => {
    expect((await problem(await intervals("K", null))).status).toBe(401);
    const res = await fetchWithKey(demoLisKey(), "/api/v1/analytes/K/intervals");
    expect(res.status).toBe(200);
    expect((await res.json()).analyte.code).toBe("K");
  });

  it("gives the analyte, its version in force and the partitions, as stored", async () => {
    const body = await (await intervals("HGB")).json();
    const { rows } = await pool.query(
      `SELECT v.id, v.number, v.effective_from, v.review_by, p.id AS pid, p.sex, p.low, p.high, p.low_ci_lower, p.low_ci_upper, p.high_ci_lower, p.high_ci_upper, p.method, p.n
       FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id JOIN interval_partitions p ON p.version_id = v.id
       WHERE a.code = 'HGB' AND v.state = 'in_force' ORDER BY p.position`,
    );
    expect(body.analyte).toEqual({ code: "HGB", name: "Haemoglobin", loinc: "718-7", unit: "g/L", decimals: 0 });
    expect(body.version).toEqual({ id: rows[0].id, number: rows[0].number, effectiveFrom: rows[0].effective_from.toISOString(), reviewBy: rows[0].review_by.toISOString() });
    expect(body.partitions).toEqual(
      rows.map((r) => ({
        id: r.pid, sex: r.sex, ageFrom: null, ageTo: null, ageFromDays: null, ageToDays: null, low: r.low, high: r.high,
        lowCi: [r.low_ci_lower, r.low_ci_upper], highCi: [r.high_ci_lower, r.high_ci_upper], method: r.method, n: r.n, unit: "g/L",
        // HL7 v2 OBX-7 "low-high" with the analyte's 0 decimals.
        hl7: { obx7: `${r.low.toFixed(0)}-${r.high.toFixed(0)}` },
        // Fixed limits: no LMS age curves (tests/api/lms-scores.test.ts has those).
        curves: null,
        // The FHIR element itself is checked in tests/api/fhir-score.test.ts.
        referenceRange: expect.objectContaining({ low: expect.objectContaining({ value: r.low }), high: expect.objectContaining({ value: r.high }) }),
      })),
    );
    expect(body.partitions.map((p: Doc) => p.sex)).toEqual(["F", "M"]);
  });

  it("finds the analyte by its LOINC code too", async () => {
    expect((await (await intervals("718-7")).json()).analyte.code).toBe("HGB");
  });

  it("answers version null for an analyte with none in force, and 404 for an unknown code", async () => {
    expect(await (await intervals(NONE)).json()).toEqual({
      analyte: { code: NONE, name: `Never signed ${NONE}`, loinc: null, unit: "mmol/L", decimals: 1 },
      version: null,
      partitions: [],
      referenceRange: [],
    });
    expect(await problem(await intervals("NOPE"))).toEqual({ status: 404, detail: "There is no analyte with the code NOPE." });
  });
});
