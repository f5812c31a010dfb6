/**
 * Indirect studies through the real route handlers on the real PostgreSQL: a study of routine
 * results, their upload (patient keys that repeat, collection date-times, settings, flags), the
 * IFCC cleaning steps with the counts the test file was built to give, the truncated maximum
 * likelihood estimate against the known truth of a simulated mixture, the refusals, a version
 * drafted from the estimate, scored once signed, and its dossier.
 */
import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { countEveryTable, grown, ownerPool } from "../support/bad-input";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL } from "../support/http-session";
import { routineCsv, routineRows } from "../support/routine-mixture";
import { createAnalyte, uniqueCode, waitFor } from "../support/scores";
import { generatedRows, donorCsv, sender, signInAll, uploadAndCommit, type Cookies } from "../support/studies";

const { pool } = testDatabase();
const owner = ownerPool();
afterAll(async () => {
  await pool.end();
  await owner.end();
});

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/** Φ⁻¹(0.975); R: qnorm(0.975). */
const Z975 = 1.959963984540054;

/**
 * The simulated laboratory (tes../support/routine-mixture.ts): 12,000 patients, 85% of them
 * non-diseased, log-normal with median 5 mmol/L and SD 0.2 of ln x; 10% diseased above, 5% below.
 */
const SPEC = { patients: 12_000, seed: 1, median: 5, sdLog: 0.2 };
/**
 * The truth: the non-diseased component's 2.5th and 97.5th percentiles, median·exp(∓qnorm(0.975)·sdLog)
 * (R: 5 * exp(qnorm(c(0.025, 0.975)) * 0.2), about 3.3785 and 7.3996).
 */
const TRUE_LOWER = SPEC.median * Math.exp(-Z975 * SPEC.sdLog);
const TRUE_UPPER = SPEC.median * Math.exp(Z975 * SPEC.sdLog);
const TRUE_WIDTH = TRUE_UPPER - TRUE_LOWER;
/**
 * The accuracy target is 0.10 of the true width per limit for ≤ 20% diseased at n ≥ 20,000
 * (tests/stats/tml-mixtures.test.ts holds it). Here n = 12,000, so the errors are about
 * √(20,000/12,000) ≈ 1.29 times larger: 0.13, rounded up to 0.15. This checks that the app
 * estimates what it stored, not the engine's accuracy.
 */
const TOLERANCE = 0.15;

/** By construction of the test file (tes../support/routine-mixture.ts, 12,000 patients). */
const ROWS = 12_000 + 12_000 / 10 + 12_000 / 8 + 12_000 / 12 + 12_000 / 5; // 18,100
const PLAN = { period: { from: "2025-01-01", to: "2025-12-31" }, excludeSettings: ["inpatient"], excludeFlags: ["haemolysed"], onePerPatient: "first" };
/** By construction of the test file: each step removes exactly the extra rows built for it. */
const STEPS = [
  { step: "period", description: "kept results collected from 2025-01-01 to 2025-12-31", before: 18_100, removed: 1_200, remaining: 16_900 },
  { step: "settings", description: "excluded the settings inpatient", before: 16_900, removed: 1_500, remaining: 15_400 },
  { step: "flags", description: "excluded results flagged haemolysed", before: 15_400, removed: 1_000, remaining: 14_400 },
  { step: "one-per-patient", description: "kept each patient's first result", before: 14_400, removed: 2_400, remaining: 12_000 },
];

let cookies: Cookies;
let send: ReturnType<typeof sender>;
const code = uniqueCode("RTI");
const TITLE = "Routine analyte 2025 (indirect)";
const DIRECT_TITLE = "Routine analyte, healthy donors";
let studyId: string;
let directStudyId: string;
/** The estimate of PLAN, as POST answered it. */
let estimate: Doc;

async function upload(id: string, csv: string, name = "routine.csv"): Promise<Response> {
  const form = new FormData();
  form.set("file", new Blob([csv]), name);
  return fetch(`${BASE_URL}/api/v1/studies/${id}/uploads`, { method: "POST", headers: { cookie: cookies.scientist }, body: form });
}

async function cancel(id: string, uploadId: string): Promise<void> {
  expect((await send("POST", `/api/v1/studies/${id}/uploads/${uploadId}/cancel`, "scientist")).status).toBe(200);
}

/** The sheet's rows, `width` cells each, an empty cell as null. */
function rowsOf(sheet: ExcelJS.Worksheet, width = 6): unknown[][] {
  const rows: unknown[][] = [];
  sheet.eachRow({ includeEmpty: false }, (row) => rows.push(Array.from({ length: width }, (_, i) => (row.values as unknown[])[i + 1] ?? null)));
  return rows;
}

/**
 * The Donor results sheet's routine columns for one patient: the columns the cleaning steps read
 * (donor code, collected at, setting, flags), found by their headers.
 */
function routineColumnsOf(sheet: ExcelJS.Worksheet, patient: string): unknown[][] {
  const rows = rowsOf(sheet, 22);
  const at = (name: string) => rows[0].indexOf(name);
  const [code, collectedAt, setting, flags] = ["Donor code", "Collected at", "Setting", "Flags"].map(at);
  expect([collectedAt, setting, flags]).toEqual([19, 20, 21]);
  return rows.slice(1).filter((r) => r[code] === patient).map((r) => [r[collectedAt], r[setting], r[flags]]);
}

/** P000013's rows as the file gave them (tests/support/routine-mixture.ts), flags joined by "; ". */
const P13_ROUTINE = [
  ["2025-01-13T08:00:00", "outpatient", "lipaemic; haemolysed"],
  ["2025-01-13T12:00:00", "outpatient", null],
];

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  await createAnalyte(cookies, { code, name: `Routine analyte ${code}`, unit: "mmol/L", decimals: 2 });
  const direct = await send("POST", "/api/v1/studies", "scientist", { analyte: code, title: DIRECT_TITLE, specimen: "serum" });
  expect(direct.status).toBe(201);
  directStudyId = (await direct.json()).id;
});

describe("an indirect study", () => {
  it("is opened by the scientist with kind indirect, and audited so", async () => {
    const before = await countEveryTable(owner);
    const res = await send("POST", "/api/v1/studies", "scientist", { analyte: code, title: TITLE, kind: "indirect", specimen: "serum" });
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(201);
    studyId = body.id;
    expect(body.kind).toBe("indirect");
    expect(await countEveryTable(owner)).toEqual(grown(before, { studies: 1, audit_events: 1 }));
    const study = await (await send("GET", `/api/v1/studies/${studyId}`, "scientist")).json();
    expect(study.kind).toBe("indirect");
    const [event] = (await pool.query("SELECT action, details->>'kind' AS kind FROM audit_events WHERE entity_id = $1", [studyId])).rows;
    expect(event).toEqual({ action: "study.created", kind: "indirect" });
  });
});

describe("routine-results uploads", () => {
  it("checks the generated file without a problem, commits it, and keeps collected_at, setting and flags as written", async () => {
    const rows = routineRows(SPEC);
    expect(rows).toHaveLength(ROWS);
    const res = await upload(studyId, routineCsv(rows));
    const report = await res.json();
    expect(res.status, JSON.stringify(report).slice(0, 2000)).toBe(201);
    expect(report.rows).toEqual({ total: 18_100, valid: 18_100, invalid: 0 });
    expect(report.problems).toEqual([]);
    expect(report.mapping).toEqual({
      patient_key: "patient_key", sex: "sex", age_years: "age_years", birth_date: "birth_date", collected_at: "collected_at",
      value: "value", unit: "unit", setting: "setting", flags: "flags",
    });
    const commit = await send("POST", `/api/v1/studies/${studyId}/uploads/${report.id}/commit`, "scientist");
    expect(commit.status).toBe(200);
    const [{ n }] = (await pool.query("SELECT count(*)::int AS n FROM donor_results WHERE study_id = $1", [studyId])).rows;
    expect(n).toBe(18_100);

    const stored = async (patient: string) =>
      (
        await pool.query(
          "SELECT collected_at, setting, flags, value FROM donor_results WHERE study_id = $1 AND donor_code = $2 ORDER BY row_number",
          [studyId, patient],
        )
      ).rows;
    const valuesOf = (patient: string) => rows.filter((r) => r.patientKey === patient).map((r) => Number(r.value));
    // Written out from the construction (tes../support/routine-mixture.ts): patient i = 0 has every
    // extra row, in the file's order; an empty flags cell is no flag, an empty setting none.
    const v1 = valuesOf("P000001");
    expect(await stored("P000001")).toEqual([
      { collected_at: "2024-12-31T23:59:00", setting: "outpatient", flags: [], value: v1[0] },
      { collected_at: "2025-01-01T07:30:00", setting: "inpatient", flags: [], value: v1[1] },
      { collected_at: "2025-01-01T08:00:00", setting: "outpatient", flags: ["haemolysed"], value: v1[2] },
      { collected_at: "2025-01-01T16:00:00", setting: "outpatient", flags: [], value: v1[3] },
      { collected_at: "2025-01-01T12:00:00", setting: "outpatient", flags: ["icteric"], value: v1[4] },
    ]);
    // Flags split at "|" and at ";" (spaces trimmed); the setting kept as written ("Inpatient").
    const v13 = valuesOf("P000013");
    expect(await stored("P000013")).toEqual([
      { collected_at: "2025-01-13T08:00:00", setting: "outpatient", flags: ["lipaemic", "haemolysed"], value: v13[0] },
      { collected_at: "2025-01-13T12:00:00", setting: "outpatient", flags: [], value: v13[1] },
    ]);
    const v25 = valuesOf("P000025");
    expect(await stored("P000025")).toEqual([
      { collected_at: "2025-01-25T07:30:00", setting: "Inpatient", flags: [], value: v25[0] },
      { collected_at: "2025-01-25T08:00:00", setting: "outpatient", flags: ["haemolysed", "icteric"], value: v25[1] },
      { collected_at: "2025-01-25T12:00:00", setting: "outpatient", flags: [], value: v25[2] },
    ]);
    expect(await stored("P000002")).toEqual([{ collected_at: "2025-01-01T00:00:00", setting: "general practice", flags: [], value: valuesOf("P000002")[0] }]);
    expect(await stored("P000003")).toEqual([{ collected_at: "2025-01-03T12:00:00", setting: null, flags: [], value: valuesOf("P000003")[0] }]);
    expect(await stored("P000004")).toEqual([{ collected_at: "2025-12-31T23:59:59", setting: "outpatient", flags: [], value: valuesOf("P000004")[0] }]);
  }, 120_000);
});

describe("routine-results uploads refused or reported", () => {
  let sideId: string;
  beforeAll(async () => {
    const res = await send("POST", "/api/v1/studies", "scientist", { analyte: code, title: "Routine analyte, side study", kind: "indirect" });
    sideId = (await res.json()).id;
  });

  it("refuses a file without collected_at whole (422), storing only the refusal's audit event", async () => {
    const before = await countEveryTable(owner);
    const res = await upload(sideId, "patient_key,sex,age_years,value,setting\nQ1,F,40,5.10,outpatient\n");
    expect(res.status).toBe(422);
    const problem = await res.json();
    const detail =
      'no column of the file is mapped to collected_at; name the file\'s header for it in the mapping (its headers: "patient_key", "sex", "age_years", "value", "setting")';
    expect(problem.detail).toBe(detail);
    expect(problem.uploadError).toBe("mapping");
    expect(await countEveryTable(owner)).toEqual(grown(before, { audit_events: 1 }));
    const [event] = (await pool.query("SELECT action, details->>'reason' AS reason FROM audit_events WHERE entity_id = $1 ORDER BY id DESC LIMIT 1", [sideId])).rows;
    expect(event).toEqual({ action: "upload.refused", reason: detail });
  });

  it("reports a collection time with a time zone as its row's problem, and a repeated patient key as none", async () => {
    const csv = [
      "patient_key,sex,age_years,birth_date,collected_at,value,unit,setting,flags",
      "Q1,F,40,,2025-03-04T08:15,5.10,,outpatient,",
      "Q2,M,51,,2025-03-04T08:15:00Z,5.20,,outpatient,",
      "Q3,F,33,,2025-03-04T08:15+01:00,5.30,,outpatient,",
      "Q1,F,40,,2025-03-05 09:00,5.40,,outpatient,",
    ].join("\n");
    const before = await countEveryTable(owner);
    const res = await upload(sideId, csv);
    const report = await res.json();
    expect(res.status, JSON.stringify(report)).toBe(201);
    expect(report.rows).toEqual({ total: 4, valid: 2, invalid: 2 });
    expect(report.problems).toEqual([
      { row: 2, column: "collected_at", message: 'collected_at "2025-03-04T08:15:00Z" has a time zone; write the local time of collection without one (YYYY-MM-DDTHH:MM[:SS])' },
      { row: 3, column: "collected_at", message: 'collected_at "2025-03-04T08:15+01:00" has a time zone; write the local time of collection without one (YYYY-MM-DDTHH:MM[:SS])' },
    ]);
    expect(await countEveryTable(owner)).toEqual(grown(before, { uploads: 1, audit_events: 1 }));
    await cancel(sideId, report.id);
  });

  it("still reports a repeated donor code in a direct study", async () => {
    const res = await upload(directStudyId, "donor_code,sex,age_years,value\nD1,F,40,5.10\nD1,F,40,5.30\nD2,M,41,4.90\n", "donors.csv");
    const report = await res.json();
    expect(res.status, JSON.stringify(report)).toBe(201);
    expect(report.rows).toEqual({ total: 3, valid: 1, invalid: 2 });
    expect(report.problems).toEqual([
      { row: 1, column: "donor_code", message: 'donor code "D1" appears in rows 1 and 2' },
      { row: 2, column: "donor_code", message: 'donor code "D1" appears in rows 1 and 2' },
    ]);
    await cancel(directStudyId, report.id);
  });
});

describe("the indirect estimate", () => {
  /** DESIGN.md's roles table written out: estimating is for directors and scientists. */
  for (const role of ["admin", "clinician"] as Role[]) {
    it(`refuses the ${role} (403) and changes nothing`, async () => {
      const before = await countEveryTable(owner);
      const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, role, { method: "indirect", cleaning: PLAN });
      expect(res.status).toBe(403);
      expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      expect(await countEveryTable(owner)).toEqual(before);
    });
  }

  it("cleans by the plan with the counts the file was built to give, and estimates near the truth", async () => {
    const before = await countEveryTable(owner);
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { method: "indirect", cleaning: PLAN });
    estimate = await res.json();
    expect(res.status, JSON.stringify(estimate).slice(0, 2000)).toBe(201);
    expect(res.headers.get("location")).toBe(`/api/v1/studies/${studyId}/estimates/${estimate.id}`);
    expect(await countEveryTable(owner)).toEqual(grown(before, { estimates: 1, audit_events: 1 }));

    expect(estimate.method).toBe("indirect");
    expect(estimate.cleaning).toEqual({ results: 18_100, excluded: 0, plan: PLAN, partition: {}, steps: STEPS });
    expect(estimate.n).toBe(STEPS.at(-1)!.remaining);
    expect(Math.abs(estimate.lower - TRUE_LOWER) / TRUE_WIDTH, `lower ${estimate.lower} against ${TRUE_LOWER}`).toBeLessThan(TOLERANCE);
    expect(Math.abs(estimate.upper - TRUE_UPPER) / TRUE_WIDTH, `upper ${estimate.upper} against ${TRUE_UPPER}`).toBeLessThan(TOLERANCE);
    // 85% non-diseased by construction; the estimate is a model's, so within 0.05 (our stated
    // tolerance, no source: the diseased components overlap the non-diseased tails).
    expect(Math.abs(estimate.fraction - 0.85)).toBeLessThan(0.05);
    expect(estimate.lowerCi[0]).toBeLessThanOrEqual(estimate.lower);
    expect(estimate.lowerCi[1]).toBeGreaterThanOrEqual(estimate.lower);
    expect(estimate.upperCi[0]).toBeLessThanOrEqual(estimate.upper);
    expect(estimate.upperCi[1]).toBeGreaterThanOrEqual(estimate.upper);
    // The scoring model a version takes is the fitted power-normal itself (DESIGN.md: gaussian on
    // the stored transform), marked as indirect.
    expect(estimate.model).toEqual({ kind: "gaussian", transform: "box-cox", lambda: estimate.lambda, mean: estimate.mu, sd: estimate.sigma, source: "indirect" });
    expect(estimate.partition).toEqual({ sex: null, ageFrom: null, ageTo: null });

    const [row] = (await pool.query("SELECT options, seed, n, upload_hashes, exclusion_ids FROM estimates WHERE id = $1", [estimate.id])).rows;
    expect(row).toMatchObject({ options: { method: "indirect", cleaning: PLAN, partition: {}, seed: 1 }, seed: 1, n: 12_000, exclusion_ids: [] });
    expect(row.upload_hashes).toHaveLength(1);
    const [event] = (await pool.query("SELECT action, details FROM audit_events WHERE entity_id = $1", [estimate.id])).rows;
    expect(event.action).toBe("estimate.created");
    expect(event.details.steps).toEqual(STEPS.map(({ step, removed, remaining }) => ({ step, removed, remaining })));
  }, 60_000);

  it("lists it with its limits and fraction, and answers the document with the histogram's bins", async () => {
    const list = await send("GET", `/api/v1/studies/${studyId}/estimates`, "scientist");
    expect(list.status).toBe(200);
    const item = ((await list.json()).items as Doc[]).find((i) => i.id === estimate.id)!;
    expect(item.indirect).toEqual({ lower: estimate.lower, upper: estimate.upper, fraction: estimate.fraction });

    const one = await send("GET", `/api/v1/studies/${studyId}/estimates/${estimate.id}`, "scientist");
    expect(one.status).toBe(200);
    const doc = await one.json();
    expect(doc.id).toBe(estimate.id);
    expect(doc.cleaning.steps).toEqual(STEPS);
    expect(doc.lower).toBe(estimate.lower);
    expect(doc.histogram.length).toBeGreaterThan(10);
    expect(Object.keys(doc.histogram[0]).sort()).toEqual(["count", "expectedNonDiseased", "lower", "open", "upper"]);
    // Every value estimated falls in one bin (common practice for a histogram, no source).
    expect(doc.histogram.reduce((s: number, b: { count: number }) => s + b.count, 0)).toBe(12_000);
  });

  it("runs the other choices: every flagged result out, each patient's last result, women only", async () => {
    // By construction of the test file, 12,000 patients: flags "any" also removes the core
    // results flagged "icteric" (i % 7 = 0: ⌈12,000/7⌉ = 1,715) beside the 1,000 flagged extras;
    // one-per-patient then removes the earlier of core and repeat for patients with both
    // (i % 5 = 0 and i % 7 ≠ 0: 2,400 − ⌈12,000/35⌉ = 2,400 − 343 = 2,057). Patients left: 12,000
    // minus those with i % 7 = 0 and i % 5 ≠ 0 (1,715 − 343 = 1,372) = 10,628; women (even i)
    // lose i % 14 = 0 and i % 70 ≠ 0 (858 − 172 = 686): 6,000 − 686 = 5,314.
    const cleaning = { period: PLAN.period, excludeSettings: ["inpatient"], excludeFlags: "any", onePerPatient: "last" };
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "director", { method: "indirect", cleaning, partition: { sex: "F" }, seed: 7 });
    const body = await res.json();
    expect(res.status, JSON.stringify(body).slice(0, 2000)).toBe(201);
    expect(body.cleaning.steps).toEqual([
      { step: "period", description: "kept results collected from 2025-01-01 to 2025-12-31", before: 18_100, removed: 1_200, remaining: 16_900 },
      { step: "settings", description: "excluded the settings inpatient", before: 16_900, removed: 1_500, remaining: 15_400 },
      { step: "flags", description: "excluded every flagged result", before: 15_400, removed: 2_715, remaining: 12_685 },
      { step: "one-per-patient", description: "kept each patient's last result", before: 12_685, removed: 2_057, remaining: 10_628 },
      { step: "partition", description: "kept the partition females", before: 10_628, removed: 5_314, remaining: 5_314 },
    ]);
    expect(body).toMatchObject({ n: 5_314, partition: { sex: "F", ageFrom: null, ageTo: null }, bootstrap: { seed: 7 } });
  }, 60_000);

  it("answers 409 for its histogram route (the histogram is in the document)", async () => {
    const res = await send("GET", `/api/v1/studies/${studyId}/estimates/${estimate.id}/chart-data`, "scientist");
    expect(res.status).toBe(409);
    expect((await res.json()).detail).toBe(
      `The estimate ${estimate.id} is an indirect estimate: its chart (the histogram with the fitted non-diseased part) is the histogram field of …/estimates/${estimate.id}.`,
    );
  });
});

describe("estimate requests refused, changing nothing", () => {
  const cases: [string, () => string, unknown, number, string][] = [
    [
      "an indirect request to a direct study",
      () => directStudyId,
      { method: "indirect" },
      409,
      `The study "${DIRECT_TITLE}" holds healthy-donor results, not routine results: an indirect estimate is for indirect studies.`,
    ],
    [
      "a direct request to an indirect study",
      () => studyId,
      {},
      409,
      `The study "${TITLE}" is an indirect study of routine results: an estimate of limits per partition does not apply to it. Estimate indirectly instead (POST …/estimates with {"method": "indirect"}).`,
    ],
    [
      // By construction: on 2025-01-01 only patient 1's core result and the 34 patients with
      // i % 360 = 0 (each with a core, an inpatient, a flagged and a repeat result) were
      // collected; one result per patient leaves 35.
      "too few results after cleaning",
      () => studyId,
      { method: "indirect", cleaning: { period: { from: "2025-01-01", to: "2025-01-01" } } },
      422,
      "The routine results (every patient) cannot be estimated: 35 results remain after cleaning; an indirect estimate needs at least 500 (several thousand are advised).",
    ],
    [
      "a period that ends before it starts",
      () => studyId,
      { method: "indirect", cleaning: { period: { from: "2025-12-31", to: "2025-01-01" } } },
      422,
      "cleaning.period.to: period.from must not be after period.to.",
    ],
    ["onePerPatient sometimes", () => studyId, { method: "indirect", cleaning: { onePerPatient: "sometimes" } }, 422, "cleaning.onePerPatient: onePerPatient is first, last or all."],
    ["an unknown cleaning step", () => studyId, { method: "indirect", cleaning: { excludeWards: ["ICU"] } }, 422, 'cleaning: Unrecognized key: "excludeWards"'],
  ];
  for (const [what, id, body, status, detail] of cases) {
    it(`${what}: ${status}`, async () => {
      const before = await countEveryTable(owner);
      const res = await send("POST", `/api/v1/studies/${id()}/estimates`, "scientist", body);
      expect(res.status).toBe(status);
      expect((await res.json()).detail).toBe(detail);
      expect(await countEveryTable(owner)).toEqual(before);
    });
  }
});

describe("a version drafted from the indirect estimate", () => {
  let directEstimateId: string;
  let version: Doc;
  beforeAll(async () => {
    await uploadAndCommit(cookies, directStudyId, donorCsv(generatedRows(120, 3)));
    const res = await send("POST", `/api/v1/studies/${directStudyId}/estimates`, "scientist", {});
    expect(res.status).toBe(201);
    directEstimateId = (await res.json()).id;
  }, 60_000);

  it("refuses a method other than the estimate's with 422, changing nothing", async () => {
    const cases: [string, string, string, string][] = [
      [studyId, estimate.id, "parametric", `partitions.0.method: the estimate ${estimate.id} is an indirect estimate from routine results; its method is indirect.`],
      [directStudyId, directEstimateId, "indirect", `partitions.0.method: the estimate ${directEstimateId} is not an indirect estimate; choose the method it was made with.`],
    ];
    for (const [study, id, method, message] of cases) {
      const before = await countEveryTable(owner);
      const res = await send("POST", "/api/v1/interval-versions", "scientist", { analyte: code, study, partitions: [{ estimate: id, method }] });
      expect(res.status).toBe(422);
      expect((await res.json()).detail).toBe(message);
      expect(await countEveryTable(owner)).toEqual(before);
    }
  });

  it("takes the estimate's limits, CIs, n and fitted model, with method indirect", async () => {
    const before = await countEveryTable(owner);
    const res = await send("POST", "/api/v1/interval-versions", "scientist", { analyte: code, study: studyId, partitions: [{ estimate: estimate.id, method: "indirect" }] });
    version = await res.json();
    expect(res.status, JSON.stringify(version)).toBe(201);
    expect(await countEveryTable(owner)).toEqual(grown(before, { interval_versions: 1, interval_partitions: 1, audit_events: 1 }));
    expect(version.partitions).toHaveLength(1);
    expect(version.partitions[0]).toMatchObject({ method: "indirect", low: estimate.lower, high: estimate.upper, n: 12_000, estimateId: estimate.id, model: estimate.model });
    const [p] = (await pool.query("SELECT * FROM interval_partitions WHERE version_id = $1", [version.id])).rows;
    expect(p).toMatchObject({
      method: "indirect", low: estimate.lower, high: estimate.upper, n: 12_000, sex: null, age_from_days: null, age_to_days: null,
      low_ci_lower: estimate.lowerCi[0], low_ci_upper: estimate.lowerCi[1], high_ci_lower: estimate.upperCi[0], high_ci_upper: estimate.upperCi[1],
    });
    expect(p.model).toEqual({ kind: "gaussian", transform: "box-cox", lambda: estimate.lambda, mean: estimate.mu, sd: estimate.sigma, source: "indirect" });
  });

  it("once signed, scores the limits at z = ∓qnorm(0.975) with the indirect-estimate caution", async () => {
    expect((await send("POST", `/api/v1/interval-versions/${version.id}/submit`, "scientist")).status).toBe(200);
    const director = demoUser("director");
    const sign = await send("POST", `/api/v1/interval-versions/${version.id}/sign`, "director", { meaning: "approved_for_clinical_use", password: director.password, email: director.email });
    const signed = await sign.json();
    expect(sign.status, JSON.stringify(signed)).toBe(200);
    expect(signed.state).toBe("in_force");
    await waitFor(async () => (await (await send("GET", `/api/v1/analytes/${code}/intervals`, "clinician")).json()).version !== null);

    const res = await send("POST", "/api/v1/scores", "clinician", { items: [{ analyte: code, value: estimate.lower }, { analyte: code, value: estimate.upper }] });
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(200);
    const [low, high] = body.results;
    // The limits are the fitted model's 2.5th and 97.5th percentiles, so z there is
    // qnorm(0.025) = −1.959964 and qnorm(0.975) = 1.959964 (R); 1e-6: the limits are stored
    // as computed, and only floating rounding separates the two transforms.
    expect(low.z).toBeCloseTo(-Z975, 6);
    expect(high.z).toBeCloseTo(Z975, 6);
    expect(low.percentile).toBeCloseTo(2.5, 4);
    expect(high.percentile).toBeCloseTo(97.5, 4);
    // Limits are inclusive (DESIGN.md: N within, limits inclusive).
    expect([low.flag, high.flag]).toEqual(["N", "N"]);
    expect(low.interval).toMatchObject({ method: "indirect", low: estimate.lower, high: estimate.upper, n: 12_000 });
    expect(low.cautions).toEqual(["general", "indirect-estimate"]);
    expect(body.cautionTexts["indirect-estimate"]).toBe(
      "This interval was estimated indirectly, from the laboratory's routine patient results with the diseased part separated statistically (truncated maximum likelihood), not from screened healthy donors. The z-score and percentile place the value on that fitted non-diseased distribution and are less certain than those of a direct study.",
    );
  }, 60_000);

  it("gives a dossier with an Indirect method sheet: the method and each cleaning step's counts", async () => {
    const res = await send("GET", `/api/v1/interval-versions/${version.id}/dossier`, "director");
    expect(res.status).toBe(200);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.load(await res.arrayBuffer());
    expect(workbook.worksheets.map((s) => s.name)).toContain("Indirect method");
    const rows = rowsOf(workbook.getWorksheet("Indirect method")!);
    expect(rows[0]).toEqual(["Estimate", "Section", "Item", "Value", "Removed", "Remaining"]);
    const mine = rows.slice(1).filter((r) => r[0] === estimate.id);
    const method = mine.find((r) => r[1] === "Method" && r[2] === "Method")!;
    expect(String(method[3])).toContain("truncated maximum likelihood");
    const cleaning = mine.filter((r) => r[1] === "Cleaning").map((r) => r.slice(2));
    expect(cleaning).toEqual([
      ["Routine results in the study", 18_100, null, 18_100],
      ["Exclusions in effect (by hand)", 0, 0, 18_100],
      ...STEPS.map((s) => [`${s.step}: ${s.description}`, s.before, s.removed, s.remaining]),
    ]);
    expect(mine.find((r) => r[2] === "Values estimated (n)")?.[3]).toBe(12_000);
    expect(mine.find((r) => r[2] === "Lower limit")?.[3]).toBe(estimate.lower);
    expect(mine.find((r) => r[2] === "Upper limit")?.[3]).toBe(estimate.upper);
    // The routine results' collection time, setting and flags, which the cleaning steps read, so
    // that each step's count can be followed from the rows.
    expect(routineColumnsOf(workbook.getWorksheet("Donor results")!, "P000013")).toEqual(P13_ROUTINE);
  }, 60_000);

  it("exports the study with its Indirect estimates sheet and the routine columns", async () => {
    const res = await send("GET", `/api/v1/studies/${studyId}/export`, "scientist");
    expect(res.status).toBe(200);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.load(await res.arrayBuffer());
    const indirect = rowsOf(workbook.getWorksheet("Indirect estimates")!);
    const steps = indirect.filter((r) => r[0] === estimate.id && r[1] === "Cleaning").slice(2).map((r) => r.slice(2));
    expect(steps).toEqual(STEPS.map((s) => [`${s.step}: ${s.description}`, s.before, s.removed, s.remaining]));
    expect(routineColumnsOf(workbook.getWorksheet("Donor results")!, "P000013")).toEqual(P13_ROUTINE);
  }, 60_000);
});
