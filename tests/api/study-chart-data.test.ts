import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";

const { pool } = testDatabase();
afterAll(() => pool.end());

/** DESIGN.md's roles table written out: donor-level data is for directors and scientists only. */
const MAY_READ: Record<Role, boolean> = { admin: false, director: true, scientist: true, clinician: false };
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];

const cookies = {} as Record<Role, string>;
function get(pathname: string, role: Role): Promise<Response> {
  return fetch(`${BASE_URL}${pathname}`, { headers: { cookie: cookies[role] } });
}

/** 80 women and 80 men (scripts/fixtures/study-analysis.R); F040 is censored ("<3.0"). */
const FIXTURE = fs.readFileSync(path.join(__dirname, "../fixtures/uploads/study-analysis.csv"));

let studyId: string;
let estimateId: string;
let exclusionId: string;

beforeAll(async () => {
  for (const role of ROLES) cookies[role] = await signInOverHttp(demoUser(role).email, demoUser(role).password);
  const opened = await fetch(`${BASE_URL}/api/v1/studies`, {
    method: "POST",
    headers: { cookie: cookies.scientist, "content-type": "application/json" },
    body: JSON.stringify({ analyte: "GLU", title: "Chart data study" }),
  });
  studyId = (await opened.json()).id;
  const form = new FormData();
  form.set("file", new Blob([FIXTURE]), "study-analysis.csv");
  const report = await (await fetch(`${BASE_URL}/api/v1/studies/${studyId}/uploads`, { method: "POST", headers: { cookie: cookies.scientist }, body: form })).json();
  const committed = await fetch(`${BASE_URL}/api/v1/studies/${studyId}/uploads/${report.id}/commit`, { method: "POST", headers: { cookie: cookies.scientist } });
  expect(await committed.json()).toEqual({ status: "committed", stored: 160 });

  // F001 excluded, the women estimated on the ln scale, then the exclusion undone.
  const send = (method: string, pathname: string, body?: unknown) =>
    fetch(`${BASE_URL}${pathname}`, {
      method,
      headers: { cookie: cookies.scientist, ...(body ? { "content-type": "application/json" } : {}) },
      body: body ? JSON.stringify(body) : undefined,
    });
  const { rows: [f001] } = await pool.query("SELECT id FROM donor_results WHERE study_id = $1 AND donor_code = 'F001'", [studyId]);
  const excluded = await send("POST", `/api/v1/studies/${studyId}/exclusions`, { donorResultIds: [Number(f001.id)], reason: "Haemolysed specimen" });
  expect(excluded.status).toBe(201);
  exclusionId = (await excluded.json()).items[0].id;
  const estimated = await send("POST", `/api/v1/studies/${studyId}/estimates`, { partition: { sex: "F" }, outliers: "none", transform: "ln", seed: 1 });
  expect(estimated.status).toBe(201);
  estimateId = (await estimated.json()).id;
  // Undone since: the chart of the estimate still leaves F001 out; the partition as it stands does not.
  expect((await send("DELETE", `/api/v1/studies/${studyId}/exclusions/${exclusionId}`)).status).toBe(200);
});

describe("GET /api/v1/studies/{id}/estimates/{estimateId}/chart-data", () => {
  for (const role of ROLES) {
    it(`${MAY_READ[role] ? "answers" : "refuses"} the ${role}`, async () => {
      const res = await get(`/api/v1/studies/${studyId}/estimates/${estimateId}/chart-data`, role);
      if (!MAY_READ[role]) {
        expect(res.status).toBe(403);
        expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
        return;
      }
      expect(res.status).toBe(200);
      const body = await res.json();
      // 80 women, less F001 (excluded when the estimate was made) and F040 (censored).
      expect(body).toMatchObject({ estimateId, partition: { sex: "F", ageFrom: null, ageTo: null }, n: 78, censored: { below: 1, above: 0 }, scale: { transform: "ln", lambda: null } });
      // R 4.2: x <- the 78 values; k <- nclass.FD(x) (8);
      // table(cut(x, seq(min(x), max(x), length.out = k + 1), include.lowest = TRUE, right = FALSE))
      expect(body.histogram.rule).toBe("freedman-diaconis");
      expect(body.histogram.bins.map((b: { count: number }) => b.count)).toEqual([4, 2, 18, 11, 23, 12, 6, 2]);
      expect(body.histogram.curve).toHaveLength(101);
      // R: qnorm((1 - 3/8) / (78 + 1/4)) = -2.4094989760; log(min(x)) = 1.4036429995, log(max(x)) = 1.7561322916;
      // mean(log(x)) = 1.5915476580, sd(log(x)) = 0.0712469724. 1e-9 covers printing to 10 decimals.
      expect(body.qq.points).toHaveLength(78);
      expect(body.qq.thinned).toBe(false);
      expect(body.qq.points[0].theoretical).toBeCloseTo(-2.409498976, 9);
      expect(body.qq.points[0].sample).toBeCloseTo(1.4036429995, 9);
      expect(body.qq.points[77].sample).toBeCloseTo(1.7561322916, 9);
      expect(body.qq.line.intercept).toBeCloseTo(1.591547658, 9);
      expect(body.qq.line.slope).toBeCloseTo(0.0712469724, 9);
      // Counts, bin edges and Q-Q points on the ln scale: no list of the donors' values.
      expect(Object.keys(body).sort()).toEqual(["censored", "estimateId", "histogram", "n", "partition", "qq", "scale"]);
      expect(Object.keys(body.histogram).sort()).toEqual(["binWidth", "bins", "curve", "rule"]);
    });
  }

  it("answers 404 for an estimate of another study or none, and 422 for an id that is no UUID", async () => {
    const missing = "00000000-0000-4000-8000-000000000000";
    const res = await get(`/api/v1/studies/${studyId}/estimates/${missing}/chart-data`, "scientist");
    expect(res.status).toBe(404);
    expect((await res.json()).detail).toBe(`There is no estimate with the id ${missing} in this study.`);
    const other = await get(`/api/v1/studies/${missing}/estimates/${estimateId}/chart-data`, "scientist");
    expect(other.status).toBe(404);
    expect((await other.json()).detail).toBe(`There is no study with the id ${missing}.`);
    const bad = await get(`/api/v1/studies/${studyId}/estimates/nope/chart-data`, "scientist");
    expect(bad.status).toBe(422);
    expect((await bad.json()).detail).toBe("estimateId: The estimate id must be a UUID.");
  });
});

describe("GET /api/v1/studies/{id}/chart-data (a partition as it stands)", () => {
  it("gives the women's measured values in rank order with the censored count, the undone exclusion counting again", async () => {
    const res = await get(`/api/v1/studies/${studyId}/chart-data?sex=F`, "director");
    expect(res.status).toBe(200);
    const body = await res.json();
    // R: the 79 measured women's values (F040 is censored); min 4.07, max 5.79.
    expect(body).toMatchObject({ partition: { sex: "F" }, n: 79, censored: { below: 1, above: 0 }, thinned: false });
    expect(body.points).toHaveLength(79);
    expect(body.points[0]).toEqual({ rank: 1, value: 4.07 });
    expect(body.points[78]).toEqual({ rank: 79, value: 5.79 });
  });

  it("leaves out a donor result whose exclusion is in effect", async () => {
    const { rows: [m017] } = await pool.query("SELECT id FROM donor_results WHERE study_id = $1 AND donor_code = 'M017'", [studyId]);
    const excluded = await fetch(`${BASE_URL}/api/v1/studies/${studyId}/exclusions`, {
      method: "POST",
      headers: { cookie: cookies.director, "content-type": "application/json" },
      body: JSON.stringify({ donorResultIds: [Number(m017.id)], reason: "Not fasting" }),
    });
    expect(excluded.status).toBe(201);
    const body = await (await get(`/api/v1/studies/${studyId}/chart-data?sex=M&ageFrom=0&ageTo=130`, "scientist")).json();
    expect(body.n).toBe(79);
    expect(body.points.some((p: { value: number }) => p.value === 11.8)).toBe(false);
  });

  it("refuses the clinician and the admin, and answers 422 for a bad partition", async () => {
    expect((await get(`/api/v1/studies/${studyId}/chart-data`, "clinician")).status).toBe(403);
    expect((await get(`/api/v1/studies/${studyId}/chart-data`, "admin")).status).toBe(403);
    const bad = await get(`/api/v1/studies/${studyId}/chart-data?ageFrom=40&ageTo=18`, "scientist");
    expect(bad.status).toBe(422);
    expect((await bad.json()).detail).toContain("ageFrom must be below ageTo");
  });
});

describe("GET /api/v1/studies/{id}/donor-results/lookup", () => {
  it("finds donor results by code and names the codes the study does not hold", async () => {
    const res = await get(`/api/v1/studies/${studyId}/donor-results/lookup?codes=F002,NOPE,F002`, "scientist");
    expect(res.status).toBe(200);
    const body = await res.json();
    // The fixture's second row: F002, a woman of 42 with 5.57 mmol/L.
    expect(body.items).toEqual([{ id: expect.any(Number), donorCode: "F002", sex: "F", ageYears: 42, value: 5.57, excluded: false }]);
    expect(body.missing).toEqual(["NOPE"]);
    expect((await get(`/api/v1/studies/${studyId}/donor-results/lookup?codes=F002`, "clinician")).status).toBe(403);
    const none = await get(`/api/v1/studies/${studyId}/donor-results/lookup?codes=,`, "scientist");
    expect(none.status).toBe(422);
    expect((await none.json()).detail).toContain("Give at least one donor code.");
  });
});
