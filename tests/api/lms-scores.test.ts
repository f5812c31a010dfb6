/**
 * Scoring against LMS age curves (issue 11) through the served app on the real database: an lms
 * version put in force through the real submit and sign routes, then scores at exact ages, the
 * intervals route's limits at requested ages, and FHIR's referenceRange age.
 */
import normal from "@stdlib/stats-base-dists-normal";
import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { LmsModel } from "@/lib/stats/lms-model";
import { testDatabase } from "../support/database";
import { BASE_URL } from "../support/http-session";
import { demoLisKey, fetchWithKey } from "../support/lis";
import { fixtureCurves, lmsPartition, scaledCurves } from "../support/lms-scores";
import { createAnalyte, putInForce, uniqueCode, waitFor } from "../support/scores";
import { signInAll, tableCounts, type Cookies } from "../support/studies";

const { pool } = testDatabase();
afterAll(() => pool.end());

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

let cookies: Cookies;
/** One both-sexes partition of curves. */
const ALP = uniqueCode("ALPC");
/** Curves per sex: the boys' median 20% above the girls'. */
const ALS = uniqueCode("ALPS");
let model: LmsModel;
let versionId: string;

/** Φ⁻¹(0.975); R: qnorm(0.975). */
const Z975 = 1.959963984540054;

/** METHODS.md §9, written out: z of x at L, M, S, and the value at z. */
const lmsZ = (x: number, p: { L: number; M: number; S: number }) => ((x / p.M) ** p.L - 1) / (p.L * p.S);
const lmsValue = (z: number, p: { L: number; M: number; S: number }) => p.M * (1 + p.L * p.S * z) ** (1 / p.L);

async function scored(items: unknown[], role: keyof Cookies = "clinician"): Promise<Doc> {
  const res = await fetch(`${BASE_URL}/api/v1/scores`, {
    method: "POST",
    headers: { "content-type": "application/json", cookie: cookies[role] },
    body: JSON.stringify({ items }),
  });
  const body = await res.json();
  expect(res.status, JSON.stringify(body)).toBe(200);
  return body;
}

const intervals = (code: string, query = "", role: keyof Cookies = "clinician") =>
  fetch(`${BASE_URL}/api/v1/analytes/${encodeURIComponent(code)}/intervals${query}`, { headers: { cookie: cookies[role] } });

beforeAll(async () => {
  cookies = await signInAll();
  const fitted = fixtureCurves();
  model = fitted.model;
  await createAnalyte(cookies, { code: ALP, name: `Alkaline phosphatase, children ${ALP}`, unit: "U/L", decimals: 0 });
  await createAnalyte(cookies, { code: ALS, name: `Alkaline phosphatase by sex ${ALS}`, unit: "U/L", decimals: 0 });
  versionId = await putInForce(pool, cookies, ALP, [lmsPartition(model, fitted.n)]);
  await putInForce(pool, cookies, ALS, [lmsPartition(model, fitted.n, "F"), lmsPartition(scaledCurves(model, 1.2), fitted.n, "M")]);
  for (const code of [ALP, ALS]) await waitFor(async () => (await (await intervals(code)).json()).version !== null);
}, 120_000);

describe("POST /api/v1/scores against LMS curves", () => {
  it("scores at the exact age: z, percentile and flag from L, M and S there, with the limits of that age", async () => {
    const { results, cautionTexts } = await scored([{ analyte: ALP, value: 270, ageYears: 4, ref: "a" }]);
    const r = results[0];
    expect(r.model).toMatchObject({ kind: "lms", ageYears: 4, ageMin: 0.027, ageMax: 17.974 });
    expect(Object.keys(r.model)).toEqual(["kind", "ageYears", "L", "M", "S", "ageMin", "ageMax"]);
    // METHODS.md §9: z = ((X/M)^L − 1)/(L·S); percentile 100·Φ(z) (Φ from @stdlib). 1e-9: the two
    // evaluations differ only in floating rounding (expm1 and log against ** in this file).
    expect(r.z).toBeCloseTo(lmsZ(270, r.model), 9);
    expect(r.percentile).toBeCloseTo(100 * normal.cdf(r.z, 0, 1), 9);
    // The limits are the 2.5th and 97.5th centiles at that age: X = M·(1 + L·S·z)^(1/L) at z = ∓Φ⁻¹(0.975).
    expect(r.interval.low).toBeCloseTo(lmsValue(-Z975, r.model), 8);
    expect(r.interval.high).toBeCloseTo(lmsValue(Z975, r.model), 8);
    // 270 U/L lies above the 97.5th centile at 4 years (about 253 U/L for these curves), z about 2.4:
    // within what 600 donors reach (Φ⁻¹(600/601) ≈ 2.94), so no tail caution.
    expect(r.flag).toBe("H");
    expect(r.hl7).toEqual({ obx7: `${r.interval.low.toFixed(0)}-${r.interval.high.toFixed(0)}`, obx8: "H" });
    expect(r.interval).toMatchObject({ method: "lms", n: 600, unit: "U/L", decimals: 0, versionId, partition: { ageFromDays: 10, ageToDays: 6566 } });
    expect(r.ageYearsUsed).toBe(4);
    expect(r.cautions).toEqual(["general", "limits-at-age", "partition-chosen"]);
    expect(cautionTexts["limits-at-age"]).toBe(
      "The limits are those of the patient's exact age on the laboratory's continuous age curves (LMS method): they change smoothly with age, so the same value may be judged differently a few months earlier or later. Check that the age is right.",
    );
  });

  it("takes the exact age from birthDate and collectedAt, and a day older means slightly other limits", async () => {
    const { results } = await scored([
      // 2022-01-01 → 2026-07-02: 4 years and 182 of the 365 days to the next birthday (arithmetic) = 4.498630137 years.
      { analyte: ALP, value: 200, birthDate: "2022-01-01", collectedAt: "2026-07-02T09:30:00Z" },
      { analyte: ALP, value: 200, birthDate: "2022-01-01", collectedAt: "2026-07-03" },
    ]);
    expect(results[0].ageYearsUsed).toBeCloseTo(4 + 182 / 365, 12);
    expect(results[0].model.ageYears).toBeCloseTo(4 + 182 / 365, 12);
    expect(results[1].ageYearsUsed).toBeCloseTo(4 + 183 / 365, 12);
    expect(results[0].interval.high).not.toBe(results[1].interval.high);
    expect(Math.abs(results[0].interval.high - results[1].interval.high)).toBeLessThan(0.5);
  });

  it("answers an age outside the curves, or no age, with an item error saying the range", async () => {
    const { results } = await scored([
      { analyte: ALP, value: 200, ageYears: 18.5, ref: "old" },
      { analyte: ALP, value: 200, ageYears: 0.01, ref: "newborn" },
      { analyte: ALP, value: 200, ref: "no-age" },
      { analyte: ALP, value: 200, ageYears: 17.974, ref: "edge" },
    ]);
    expect(results[0]).toEqual({
      ref: "old",
      error: {
        type: "urn:bellwether:problem:no_partition",
        title: "No partition applies",
        detail: `The interval in force for ${ALP} (version 1) follows age curves that cover 0.03 to 17.97 years; the patient's age, 18.5 years, is outside them, and the curves are not extrapolated.`,
      },
    });
    expect(results[1].error.detail).toBe(
      `The interval in force for ${ALP} (version 1) follows age curves that cover 0.03 to 17.97 years; the patient's age, 0.01 years, is outside them, and the curves are not extrapolated.`,
    );
    expect(results[2].error.detail).toBe(
      `The interval in force for ${ALP} (version 1) follows age curves: give the patient's exact age (birthDate and collectedAt, or ageYears).`,
    );
    // The oldest age itself is on the curves (their range is closed).
    expect(results[3].flag).toBe("N");
  });

  it("chooses the curves by sex, and asks for the sex when the curves are per sex", async () => {
    const { results } = await scored([
      { analyte: ALS, value: 250, ageYears: 4, sex: "F" },
      { analyte: ALS, value: 250, ageYears: 4, sex: "male" },
      { analyte: ALS, value: 250, ageYears: 4 },
      { analyte: ALS, value: 250, ageYears: 30, sex: "M" },
    ]);
    // The boys' curves were given a median 1.2 times the girls' (scaledCurves), L and S the same.
    expect(results[1].model.M / results[0].model.M).toBeCloseTo(1.2, 12);
    expect(results[1].model.L).toBe(results[0].model.L);
    expect(results[0].interval.partition.sex).toBe("F");
    expect(results[0].cautions).toContain("partition-chosen");
    expect(results[2].error.detail).toBe(`The interval in force for ${ALS} (version 1) is partitioned by sex and has no partition for both sexes: give sex (F or M).`);
    expect(results[3].error.detail).toBe(
      `The interval in force for ${ALS} (version 1) follows age curves that cover 0.03 to 17.97 years (male); the patient's age, 30 years, is outside them, and the curves are not extrapolated.`,
    );
  });

  it("gives a value of 0 a flag and no z, saying why", async () => {
    const { results, cautionTexts } = await scored([{ analyte: ALP, value: 0, ageYears: 2 }]);
    expect(results[0]).toMatchObject({ z: null, percentile: null, flag: "L" });
    expect(results[0].cautions).toEqual(["general", "limits-at-age", "z-undefined", "partition-chosen"]);
    expect(cautionTexts["z-undefined"]).toContain("defined for positive values only");
  });

  it("scores for an LIS key as for a person", async () => {
    const res = await fetchWithKey(demoLisKey(), "/api/v1/scores", { method: "POST", body: { items: [{ analyte: ALP, value: 150, ageYears: 12 }] } });
    expect(res.status).toBe(200);
    const { results } = await res.json();
    expect(results[0]).toMatchObject({ flag: "N", ageYearsUsed: 12, model: { kind: "lms", ageYears: 12 } });
  });
});

describe("GET /api/v1/analytes/{code}/intervals for LMS curves", () => {
  it("lists the curves' age range without fixed limits, and a text referenceRange over those ages", async () => {
    const res = await intervals(ALP);
    expect(res.status).toBe(200);
    const body = await res.json();
    const [p] = body.partitions;
    expect(p).toMatchObject({ low: null, high: null, method: "lms", n: 600, ageFromDays: 10, ageToDays: 6566, curves: { kind: "lms", ageMin: 0.027, ageMax: 17.974 } });
    expect(p.atAges).toBeUndefined();
    expect(p.hl7).toEqual({ obx7: "" });
    expect(p.referenceRange.low).toBeUndefined();
    expect(p.referenceRange.age).toEqual({
      low: { value: 0.027, unit: "years", system: "http://unitsofmeasure.org", code: "a" },
      high: { value: 17.974, unit: "years", system: "http://unitsofmeasure.org", code: "a" },
    });
    expect(p.referenceRange.text).toBe(
      "Limits continuous in age (LMS age curves): the 2.5th and 97.5th centiles at the patient's exact age; age 0.027 to 17.974 years. Reference interval: the central 95% of healthy reference individuals (2.5th to 97.5th percentile).",
    );
    expect(body.referenceRange).toEqual([p.referenceRange]);
  });

  it("gives the limits at the requested ages the curves cover, each as a referenceRange at that exact age", async () => {
    const res = await intervals(ALP, "?ages=1,4,%2030", "clinician");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.ages).toEqual([1, 4, 30]);
    const [p] = body.partitions;
    expect(p.atAges.map((a: Doc) => a.ageYears)).toEqual([1, 4]);
    // The same limits as a score at that age (the previous describe: 4 years).
    const { results } = await scored([{ analyte: ALP, value: 100, ageYears: 4 }]);
    expect(p.atAges[1].low).toBe(results[0].interval.low);
    expect(p.atAges[1].high).toBe(results[0].interval.high);
    expect(p.atAges[1].hl7.obx7).toBe(results[0].hl7.obx7);
    expect(p.atAges[1].referenceRange.age).toEqual({
      low: { value: 4, unit: "years", system: "http://unitsofmeasure.org", code: "a" },
      high: { value: 4, unit: "years", system: "http://unitsofmeasure.org", code: "a" },
    });
    expect(p.atAges[1].referenceRange.low.value).toBe(p.atAges[1].low);
    expect(p.atAges[1].referenceRange.text).toMatch(/^\d+ to \d+ U\/L; at the exact age of 4 years \(LMS age curves\)\. Reference interval/);
    expect(body.referenceRange).toEqual(p.atAges.map((a: Doc) => a.referenceRange));
  });

  it("serves LIS keys, and lists per-sex curves with their sex", async () => {
    const res = await fetchWithKey(demoLisKey(), `/api/v1/analytes/${ALS}/intervals?ages=2`);
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.partitions.map((p: Doc) => [p.sex, p.atAges.length])).toEqual([["F", 1], ["M", 1]]);
    expect(body.referenceRange.map((r: Doc) => r.appliesTo[0].text)).toEqual(["Female", "Male"]);
  });

  it("refuses ages it cannot read with 422 and changes nothing", async () => {
    const tables = ["interval_versions", "interval_partitions", "audit_events"];
    const before = await tableCounts(pool, tables);
    for (const [query, detail] of [
      ["?ages=1,abc", '"abc" is not an age in years from 0 to 150; give ages such as 0.5,1,2.25'],
      ["?ages=", '"" is not an age in years from 0 to 150; give ages such as 0.5,1,2.25'],
      ["?ages=-1", '"-1" is not an age in years from 0 to 150; give ages such as 0.5,1,2.25'],
      [`?ages=${Array(201).fill(1).join(",")}`, "give at most 200 ages (got 201)"],
    ]) {
      const res = await intervals(ALP, query);
      expect(res.status, query).toBe(422);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect((await res.json()).detail, query).toContain(detail);
    }
    expect(await tableCounts(pool, tables)).toEqual(before);
  });
});

describe("FHIR $score against LMS curves", () => {
  it("carries the exact age in referenceRange.age (low = high) with that age's limits", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/fhir/Observation/$score`, {
      method: "POST",
      headers: { "content-type": "application/fhir+json", cookie: cookies.clinician },
      body: JSON.stringify({
        resourceType: "Observation",
        status: "final",
        contained: [{ resourceType: "Patient", id: "child", gender: "male", birthDate: "2022-01-01" }],
        code: { coding: [{ system: "urn:bellwether:codesystem:analyte", code: ALP }] },
        subject: { reference: "#child" },
        effectiveDateTime: "2026-07-02T09:30:00Z",
        valueQuantity: { value: 200, unit: "U/L", system: "http://unitsofmeasure.org", code: "U/L" },
      }),
    });
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(200);
    const { results } = await scored([{ analyte: ALP, value: 200, birthDate: "2022-01-01", collectedAt: "2026-07-02" }]);
    const [range] = body.referenceRange;
    const age = 4 + 182 / 365;
    expect(range.age.low.value).toBeCloseTo(age, 12);
    expect(range.age.high.value).toBe(range.age.low.value);
    expect(range.low.value).toBe(results[0].interval.low);
    expect(range.high.value).toBe(results[0].interval.high);
    expect(range.text).toContain("at the exact age of 4.5 years (LMS age curves)");
    expect(body.interpretation[0].coding[0].code).toBe("N");
    expect(body.note.map((n: Doc) => n.text)).toContain(
      "The limits are those of the patient's exact age on the laboratory's continuous age curves (LMS method): they change smoothly with age, so the same value may be judged differently a few months earlier or later. Check that the age is right.",
    );
  });
});

describe("pages and exports that show an lms version", () => {
  const page = async (path: string, role: keyof Cookies) => {
    const res = await fetch(`${BASE_URL}${path}`, { headers: { cookie: cookies[role] }, redirect: "manual" });
    expect(res.status, path).toBe(200);
    return res.text();
  };

  it("shows the curves and the limits at ages on the intervals page, to a clinician too", async () => {
    const html = await page(`/intervals/${ALP}`, "clinician");
    expect(html).toContain("age curves 0.03 to 17.97 years");
    expect(html).toContain('data-testid="lms-limits-table"');
    expect(html).toContain('data-testid="lms-curves-chart"');
    expect(html).toContain("by age (LMS curves)");
    expect(html).toContain("LMS age curves (Cole and Green)");
  });

  it("shows them on the version review page and the sign-off record", async () => {
    const review = await page(`/versions/${versionId}`, "director");
    expect(review).toContain('data-testid="lms-partitions"');
    expect(review).toContain("The curves and the limits at each age are shown under Partitions.");
    const record = await page(`/versions/${versionId}/record`, "director");
    expect(record).toContain('data-testid="lms-limits-table"');
  });

  it("writes the limits at ages into the dossier's Age curves sheet, the same as the intervals route gives", async () => {
    const res = await fetch(`${BASE_URL}/api/v1/interval-versions/${versionId}/dossier`, { headers: { cookie: cookies.director } });
    expect(res.status).toBe(200);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.load(Buffer.from(await res.arrayBuffer()) as unknown as ExcelJS.Buffer);
    const sheet = workbook.getWorksheet("Age curves");
    expect(sheet).toBeDefined();
    const rows = (sheet!.getSheetValues() as unknown[][]).filter(Boolean).map((r) => r.slice(1));
    expect(rows[0]).toEqual(["Position", "Partition", "Age (years)", "Lower limit (U/L)", "Median (U/L)", "Upper limit (U/L)", "L", "M", "S"]);
    const atFour = rows.find((r) => r[2] === 4)!;
    const api = await (await intervals(ALP, "?ages=4")).json();
    expect(atFour.slice(0, 2)).toEqual([1, "age curves 0.03 to 17.97 years"]);
    expect(atFour[3]).toBe(api.partitions[0].atAges[0].low);
    expect(atFour[5]).toBe(api.partitions[0].atAges[0].high);
    // The first and last rows are the curves' own age range.
    expect(rows[1][2]).toBe(0.027);
    expect(rows.at(-1)![2]).toBe(17.974);
  });
});
