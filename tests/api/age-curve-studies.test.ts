/**
 * Age-curve studies through the real route handlers on the real PostgreSQL: the study's kind,
 * exact ages at upload, the LMS fit stored as an estimate, its chart and diagnostics, the direct
 * steps refused, and a version whose partition holds the curves (issue 11's partition contract).
 */
import { execFile } from "node:child_process";
import ExcelJS from "exceljs";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import type { LmsEstimateDocument } from "@/lib/studies/age-curves";
import { ageCurveCsv, fixtureDonors } from "../support/age-curves";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL } from "../support/http-session";
import { createAnalyte, uniqueCode } from "../support/scores";
import { sender, signInAll, tableCounts, uploadAndCommit, type Cookies } from "../support/studies";

const exec = promisify(execFile);
const ROOT = path.resolve(__dirname, "../..");
const { pool } = testDatabase();
afterAll(() => pool.end());

const TABLES = ["studies", "uploads", "donor_results", "exclusions", "outlier_decisions", "partition_assessments", "estimates", "interval_versions", "interval_partitions", "audit_events"];
/** DESIGN.md's roles table written out: studies, fits and drafts are for directors and scientists. */
const MAY_WORK: Record<Role, boolean> = { admin: false, director: true, scientist: true, clinician: false };
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];

let cookies: Cookies;
let send: ReturnType<typeof sender>;
const code = uniqueCode("ALPT");
let studyId: string;
let directStudyId: string;

async function upload(id: string, csv: string, role: Role = "scientist"): Promise<Response> {
  const form = new FormData();
  form.set("file", new Blob([csv]), "donors.csv");
  return fetch(`${BASE_URL}/api/v1/studies/${id}/uploads`, { method: "POST", headers: { cookie: cookies[role] }, body: form });
}

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  await createAnalyte(cookies, { code, name: "Alkaline phosphatase (age-curve test)", unit: "U/L", decimals: 0 });
  const res = await send("POST", "/api/v1/studies", "scientist", { analyte: code, title: "ALP children 0-18", kind: "age_curve", specimen: "serum" });
  expect(res.status).toBe(201);
  studyId = (await res.json()).id;
  const direct = await send("POST", "/api/v1/studies", "scientist", { analyte: code, title: "ALP adults", specimen: "serum" });
  directStudyId = (await direct.json()).id;
});

describe("a study's kind", () => {
  it("is age_curve when asked, direct by default, and answered with the study", async () => {
    const study = await (await send("GET", `/api/v1/studies/${studyId}`, "scientist")).json();
    expect(study.kind).toBe("age_curve");
    const direct = await (await send("GET", `/api/v1/studies/${directStudyId}`, "scientist")).json();
    expect(direct.kind).toBe("direct");
    const [event] = (await pool.query("SELECT summary, details->>'kind' AS kind FROM audit_events WHERE entity_id = $1", [studyId])).rows;
    expect(event).toEqual({ summary: 'Opened the age-curve study "ALP children 0-18" for ' + code, kind: "age_curve" });
  });

  it("refuses an unknown kind with 422 and changes nothing", async () => {
    const before = await tableCounts(pool, TABLES);
    const res = await send("POST", "/api/v1/studies", "scientist", { analyte: code, title: "x", kind: "curves" });
    expect(res.status).toBe(422);
    expect((await res.json()).detail).toContain("kind: kind is direct, age_curve or indirect.");
    expect(await tableCounts(pool, TABLES)).toEqual(before);
  });
});

describe("uploads to an age-curve study need exact ages", () => {
  it("refuses a file without birth_date and collected_on whole (422), storing only the refusal's audit event", async () => {
    const before = await tableCounts(pool, TABLES);
    const csv = "donor_code,sex,age_years,value\nA1,F,3.5,200\nA2,M,4.5,210\n";
    const res = await upload(studyId, csv);
    expect(res.status).toBe(422);
    const problem = await res.json();
    expect(problem.detail).toBe(
      "An age-curve study needs each donor's exact age: the file has no birth_date column and no collected_on column. Map birth_date and collected_on (age in years alone is refused), or upload the results to a study of limits per partition.",
    );
    expect(problem.uploadError).toBe("exact_ages_required");
    expect(await tableCounts(pool, TABLES)).toEqual({ ...before, audit_events: before.audit_events + 1 });
  });

  it("reports rows with age_years only and censored values as problems of their rows", async () => {
    const csv = [
      "donor_code,sex,age_years,birth_date,collected_on,value,unit",
      "B1,F,,2020-03-01,2026-01-05,230,",
      "B2,M,5.8,,,220,",
      "B3,F,,2019-07-15,2026-01-05,<40,",
      "B4,M,,2018-01-05,2026-01-05,250,",
    ].join("\n");
    const res = await upload(studyId, csv);
    expect(res.status).toBe(201);
    const report = await res.json();
    expect(report.rows).toEqual({ total: 4, valid: 2, invalid: 2 });
    expect(report.problems).toEqual([
      { row: 2, column: "birth_date", message: "An age-curve study needs the exact age: give birth_date and collected_on (age_years alone is refused)." },
      {
        row: 3,
        column: "value",
        message: "An age-curve study needs measured values: a censored value (< or >) cannot be placed on the curves; give the measured value or leave the row out.",
      },
    ]);
    const cancel = await send("POST", `/api/v1/studies/${studyId}/uploads/${report.id}/cancel`, "scientist");
    expect(cancel.status).toBe(200);
  });

  it("takes a direct study's age_years file as before", async () => {
    const res = await upload(directStudyId, "donor_code,sex,age_years,value\nA1,F,35,80\n");
    expect(res.status).toBe(201);
    const report = await res.json();
    expect(report.rows).toEqual({ total: 1, valid: 1, invalid: 0 });
    await send("POST", `/api/v1/studies/${directStudyId}/uploads/${report.id}/cancel`, "scientist");
  });
});

describe("the LMS fit", () => {
  /** The answer of the fit, as the API gives it (lib/studies/age-curves.ts's document plus id and partition). */
  let estimate: LmsEstimateDocument & { id: string; partition: unknown; [key: string]: unknown };
  beforeAll(async () => {
    await uploadAndCommit(cookies, studyId, ageCurveCsv(fixtureDonors()));
  });

  for (const role of ROLES.filter((r) => !MAY_WORK[r])) {
    it(`refuses the ${role} (403) and changes nothing`, async () => {
      const before = await tableCounts(pool, TABLES);
      const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, role, { method: "lms" });
      expect(res.status).toBe(403);
      expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      expect(await tableCounts(pool, TABLES)).toEqual(before);
    });
  }

  it("stores the curves as an estimate, audited, with seed, exclusions and upload hashes", async () => {
    const before = await tableCounts(pool, TABLES);
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", { method: "lms" });
    estimate = await res.json();
    expect(res.status, JSON.stringify(estimate)).toBe(201);
    expect(res.headers.get("location")).toBe(`/api/v1/studies/${studyId}/estimates/${estimate.id}`);
    expect(await tableCounts(pool, TABLES)).toEqual({ ...before, estimates: before.estimates + 1, audit_events: before.audit_events + 1 });
    expect(estimate).toMatchObject({ method: "lms", sex: null, seed: 1, n: 600, excluded: 0, partition: { sex: null, ageFrom: null, ageTo: null } });
    expect(estimate.model).toMatchObject({ kind: "lms", ageTransform: "sqrt", intervals: 24 });
    expect(estimate.model.L).toHaveLength(27);
    const [row] = (await pool.query("SELECT options, seed, n, upload_hashes, exclusion_ids FROM estimates WHERE id = $1", [estimate.id])).rows;
    expect(row.options).toEqual({ method: "lms", sex: null, seed: 1 });
    expect(row.upload_hashes).toHaveLength(1);
    expect(row.exclusion_ids).toEqual([]);
    // The combined fit compares the sexes once age is taken out (Harris-Boyd on z): the fixture's
    // donors come from one set of curves with the sexes alternating, so they should not differ.
    expect(estimate.sexComparison!.harrisBoyd.verdict).toBe("combine");
    expect(estimate.sexComparison!.women.n + estimate.sexComparison!.men.n).toBe(600);
    expect(estimate.advice[0]).toBe(
      "600 donors fitted: enough for LMS curves if the diagnostics show every age range covered.",
    );
  });

  it("equals `bellwether lms` on the same ages and values with the same seed", async () => {
    const donors = (await pool.query("SELECT age_years, value FROM donor_results WHERE study_id = $1 ORDER BY id", [studyId])).rows;
    const dir = mkdtempSync(path.join(tmpdir(), "bw-lms-"));
    const file = path.join(dir, "donors.csv");
    writeFileSync(file, `age_years,value\n${donors.map((d) => `${d.age_years},${d.value}`).join("\n")}\n`);
    const { stdout } = await exec(path.join(ROOT, "node_modules/.bin/tsx"), ["scripts/bellwether.ts", "lms", file, "--at", estimate.at.join(","), "--seed", "1"], { cwd: ROOT });
    const cli = JSON.parse(stdout);
    for (const key of ["n", "at", "lower", "median", "upper", "L", "M", "S", "edf"]) expect(estimate[key], key).toEqual(cli[key]);
    for (const w of cli.warnings) expect(estimate.warnings).toContain(w);
  }, 60_000);

  it("comes near the true curves of scripts/fixtures/lms-curves.R", async () => {
    // Truth: tests/fixtures/lms/lms-truth.json (the R script's curves). 600 donors are a fifth of
    // the accuracy test's 3,000, so the errors are about √5 larger than its 0.04 target per limit
    // (≈ 0.09), and larger still near the ends of the age range (0.5 years: 0.165 measured here):
    // 0.2 of the true 95% width at the shared ages is the guard; tests/stats/lms-accuracy.test.ts
    // holds the real target. This check is that the app fits what it stored, not the engine's accuracy.
    const truth = JSON.parse((await import("node:fs")).readFileSync(path.join(ROOT, "tests/fixtures/lms/lms-truth.json"), "utf8"));
    for (const [i, age] of (truth.ages as number[]).entries()) {
      const j = (estimate.at as number[]).indexOf(age);
      if (j < 0) continue;
      const width = truth.upper[i] - truth.lower[i];
      expect(Math.abs(estimate.lower[j]! - truth.lower[i]) / width, `lower at ${age}`).toBeLessThan(0.2);
      expect(Math.abs(estimate.upper[j]! - truth.upper[i]) / width, `upper at ${age}`).toBeLessThan(0.2);
    }
  });

  it("fits one sex on its own", async () => {
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "director", { method: "lms", sex: "F", seed: 7 });
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(201);
    expect(body).toMatchObject({ sex: "F", seed: 7, n: 300, sexComparison: null, partition: { sex: "F", ageFrom: null, ageTo: null } });
  });

  it("exports the curves in the study workbook: one Estimates row per fit, the curves by age in Age curves", async () => {
    const res = await send("GET", `/api/v1/studies/${studyId}/export`, "scientist");
    expect(res.status).toBe(200);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.load(await res.arrayBuffer());
    const cells = (name: string) => {
      const rows: unknown[][] = [];
      workbook.getWorksheet(name)!.eachRow((row) => rows.push((row.values as unknown[]).slice(1)));
      return rows;
    };
    const methods = cells("Estimates").slice(1).filter((r) => r[0] === estimate.id).map((r) => r[10]);
    expect(methods).toEqual(["lms"]);
    const curves = cells("Age curves");
    expect(curves[0].slice(0, 11)).toEqual(["Estimate", "Sex", "Seed", "n", "Age (years)", "L", "M", "S", "2.5th centile", "50th centile", "97.5th centile"]);
    const mine = curves.slice(1).filter((r) => r[0] === estimate.id);
    expect(mine.map((r) => Number(r[4]))).toEqual(estimate.at);
    expect(mine.map((r) => Number(r[8]))).toEqual(estimate.lower);
    expect(mine.map((r) => Number(r[10]))).toEqual(estimate.upper);
  });

  const invalid: [string, unknown, string][] = [
    ["an unknown sex", { method: "lms", sex: "X" }, "sex: sex is F, M or null (both sexes together)."],
    ["a seed that is not whole", { method: "lms", seed: 1.5 }, "seed: seed is a whole number."],
    ["a field the fit does not know", { method: "lms", outliers: "horn" }, 'Unrecognized key: "outliers"'],
  ];
  for (const [what, body, message] of invalid) {
    it(`answers 422 for ${what} and changes nothing`, async () => {
      const before = await tableCounts(pool, TABLES);
      const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", body);
      expect(res.status).toBe(422);
      expect((await res.json()).detail).toContain(message);
      expect(await tableCounts(pool, TABLES)).toEqual(before);
    });
  }

  it("answers 404 for an unknown study and 409 for a direct study, changing nothing", async () => {
    const before = await tableCounts(pool, TABLES);
    const unknown = await send("POST", "/api/v1/studies/00000000-0000-4000-8000-000000000000/estimates", "scientist", { method: "lms" });
    expect(unknown.status).toBe(404);
    expect((await unknown.json()).detail).toBe("There is no study with the id 00000000-0000-4000-8000-000000000000.");
    const direct = await send("POST", `/api/v1/studies/${directStudyId}/estimates`, "scientist", { method: "lms" });
    expect(direct.status).toBe(409);
    expect((await direct.json()).detail).toBe('The study "ALP adults" estimates limits per partition, not age curves: an LMS fit is for age-curve studies.');
    expect(await tableCounts(pool, TABLES)).toEqual(before);
  });

  it("answers 422 when too few donors remain, saying why", async () => {
    const small = await send("POST", "/api/v1/studies", "scientist", { analyte: code, title: "ALP pilot", kind: "age_curve" });
    const smallId = (await small.json()).id;
    await uploadAndCommit(cookies, smallId, ageCurveCsv(fixtureDonors().slice(0, 40), { prefix: "S" }));
    const before = await tableCounts(pool, TABLES);
    const res = await send("POST", `/api/v1/studies/${smallId}/estimates`, "scientist", { method: "lms" });
    expect(res.status).toBe(422);
    const detail = (await res.json()).detail as string;
    expect(detail.startsWith("The donors (both sexes, 40 without an exclusion in effect) cannot be fitted: ")).toBe(true);
    expect(await tableCounts(pool, TABLES)).toEqual(before);
  });

  it("gives the chart: the three centile curves, the donors with their z, and the diagnostics", async () => {
    const res = await send("GET", `/api/v1/studies/${studyId}/estimates/${estimate.id}/age-curves`, "scientist");
    const chart = await res.json();
    expect(res.status).toBe(200);
    expect(chart).toMatchObject({ estimateId: estimate.id, sex: null, n: 600, unit: "U/L", ageRange: estimate.ageRange });
    expect(chart.curves).toHaveLength(121);
    expect(chart.curves[0].age).toBe(Math.round(estimate.ageRange.min * 1e4) / 1e4);
    for (const p of chart.curves) expect(p.lower < p.median && p.median < p.upper).toBe(true);
    expect(chart.donors.points).toHaveLength(600);
    expect(chart.donors.thinned).toBe(false);
    // About 95% of the donors lie between the curves they were fitted to (common practice: the
    // 2.5th and 97.5th centiles); 600 donors give a binomial SD of 0.9 percentage points.
    const inside = chart.donors.points.filter((d: { z: number }) => Math.abs(d.z) <= 1.959964).length / 600;
    expect(inside).toBeGreaterThan(0.92);
    expect(inside).toBeLessThan(0.98);
    expect(chart.diagnostics.groups.length).toBeGreaterThanOrEqual(2);
    expect(Object.keys(chart.diagnostics.groups[0]).sort()).toEqual(["above", "ageFrom", "ageTo", "below", "meanZ", "n", "qq", "sdZ"]);
  });

  it("refuses the clinician the chart (403) and the histogram route for curves (409)", async () => {
    const clinician = await send("GET", `/api/v1/studies/${studyId}/estimates/${estimate.id}/age-curves`, "clinician");
    expect(clinician.status).toBe(403);
    const histogram = await send("GET", `/api/v1/studies/${studyId}/estimates/${estimate.id}/chart-data`, "scientist");
    expect(histogram.status).toBe(409);
    expect((await histogram.json()).detail).toBe(
      `The estimate ${estimate.id} holds LMS age curves, not limits: its chart and diagnostics are at …/estimates/${estimate.id}/age-curves.`,
    );
  });

  describe("the steps of direct studies answer 409 and change nothing", () => {
    const steps: [string, string, string, unknown, string][] = [
      ["POST", "screen", "an outlier screen of limits per partition", { rule: "horn" }, ""],
      ["POST", "outlier-decisions", "a decision on an outlier proposal", { donorResultId: 1, rule: "horn", decision: "keep", reason: "x" }, ""],
      ["POST", "partition-assessment", "a partition assessment by sex or age band", { by: "sex" }, ""],
      ["PUT", "partition-plan", "a partition plan", { sex: true, ageBands: null }, ""],
      ["POST", "estimates", "an estimate of limits per partition", {}, ""],
    ];
    for (const [method, step, what, body] of steps) {
      it(`${method} …/${step}`, async () => {
        const before = await tableCounts(pool, TABLES);
        const res = await send(method, `/api/v1/studies/${studyId}/${step}`, "scientist", body);
        expect(res.status).toBe(409);
        expect((await res.json()).detail).toBe(
          `The study "ALP children 0-18" is an age-curve study: ${what} does not apply to it. Fit the LMS curves instead (POST …/estimates with {"method": "lms"}).`,
        );
        expect(await tableCounts(pool, TABLES)).toEqual(before);
      });
    }
  });

  describe("drafting a version from the curves", () => {
    it("refuses mismatched methods and overlapping curves with 422, changing nothing", async () => {
      const items = (await (await send("GET", `/api/v1/studies/${studyId}/estimates`, "scientist")).json()).items as { id: string; options: { sex: string | null } }[];
      const women = items.find((i) => i.options.sex === "F")!;
      const cases: [unknown, string][] = [
        [[{ estimate: estimate.id, method: "nonparametric" }], `partitions.0.method: the estimate ${estimate.id} holds LMS age curves; its method is lms.`],
        [
          [
            { estimate: estimate.id, method: "lms" },
            { estimate: women.id, method: "lms" },
          ],
          "overlap: each patient must fall in one partition only.",
        ],
      ];
      for (const [partitions, message] of cases) {
        const before = await tableCounts(pool, TABLES);
        const res = await send("POST", "/api/v1/interval-versions", "scientist", { analyte: code, study: studyId, partitions });
        expect(res.status).toBe(422);
        expect((await res.json()).detail).toContain(message);
        expect(await tableCounts(pool, TABLES)).toEqual(before);
      }
    });

    it("stores a partition by issue 11's contract, and it is submitted and signed like any other", async () => {
      const before = await tableCounts(pool, TABLES);
      const res = await send("POST", "/api/v1/interval-versions", "scientist", { analyte: code, study: studyId, partitions: [{ estimate: estimate.id, method: "lms" }] });
      const version = await res.json();
      expect(res.status, JSON.stringify(version)).toBe(201);
      expect(await tableCounts(pool, TABLES)).toEqual({
        ...before,
        interval_versions: before.interval_versions + 1,
        interval_partitions: before.interval_partitions + 1,
        audit_events: before.audit_events + 1,
      });
      const [p] = (await pool.query("SELECT * FROM interval_partitions WHERE version_id = $1", [version.id])).rows;
      // The contract (prompts: issue 11's split): method lms, the LmsModel exactly, no fixed
      // limits, ageFromDays = ceil(ageMin·365.25), ageToDays = floor(ageMax·365.25) + 1.
      expect(p).toMatchObject({ method: "lms", low: null, high: null, low_ci_lower: null, high_ci_upper: null, sex: null, n: 600, estimate_id: estimate.id });
      expect(p.model).toEqual(estimate.model);
      expect(p.age_from_days).toBe(Math.ceil(estimate.model.ageMin * 365.25));
      expect(p.age_to_days).toBe(Math.floor(estimate.model.ageMax * 365.25) + 1);
      expect(version.partitions[0]).toMatchObject({ method: "lms", low: null, high: null, ageFrom: estimate.model.ageMin, ageTo: estimate.model.ageMax, model: estimate.model });

      const submit = await send("POST", `/api/v1/interval-versions/${version.id}/submit`, "scientist");
      expect(submit.status).toBe(200);
      const director = demoUser("director");
      const sign = await send("POST", `/api/v1/interval-versions/${version.id}/sign`, "director", {
        meaning: "approved_for_clinical_use",
        password: director.password,
        email: director.email,
      });
      const signed = await sign.json();
      expect(sign.status, JSON.stringify(signed)).toBe(200);
      expect(signed.state).toBe("in_force");
    });
  });
});
