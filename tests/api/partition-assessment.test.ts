import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { donorCsv, FIXTURES, readFixtureRows, studyApi } from "../support/study-api";

const { pool } = testDatabase();
afterAll(() => pool.end());
const { signInAll, send, counts, studyWithDonors, expectProblem } = studyApi(pool);

interface Summary {
  n: number;
  mean: number;
  sd: number;
  median: number;
}
interface TwoGroups {
  groups: [Summary, Summary];
  harrisBoyd: { z: number; zCritical: number; sdRatio: number; verdict: string };
  lahti: { lower: number; upper: number; first: [number, number]; second: [number, number]; verdict: string };
}
/**
 * Expected numbers from base R (scripts/fixtures/screening-partitions.R; its header gives the
 * command and the formulas: Harris & Boyd 1990, Lahti et al. 2002/2004 with type-6 combined
 * limits) on tests/fixtures/partition-sex-age.csv, which the same script wrote.
 */
const EXPECTED = JSON.parse(fs.readFileSync(path.join(FIXTURES, "screening-partitions.json"), "utf8")).partitions as { sex: TwoGroups; age: TwoGroups };

/**
 * The fixture's rows, plus a censored result (left out, with a warning) and a gross value that
 * is excluded before assessing (so that R's numbers, computed without either, must hold).
 */
const ROWS = readFixtureRows("partition-sex-age.csv");
const CSV = donorCsv([...ROWS, { code: "X001", sex: "F", age: 30, value: "<3.0" }, { code: "X002", sex: "M", age: 50, value: "99" }]);

let study: { id: string; ids: Record<string, number> };
const url = (tail: string, id = study.id) => `/api/v1/studies/${id}${tail}`;

beforeAll(async () => {
  await signInAll();
  study = await studyWithDonors(`Partitions ${Date.now()}`, CSV);
  const excluded = await send("POST", url("/exclusions"), "scientist", { donorResultIds: [study.ids.X002], reason: "Haemolysed." });
  expect(excluded.status).toBe(201);
});

// Tolerance: R and the engine both compute in IEEE doubles with different summation orders;
// 1e-9 relative is far below any reported digit.
function expectClose(actual: number, expected: number) {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(expected)));
}

function checkAgainstR(body: Record<string, unknown> & { groups: Summary[]; comparisons: Record<string, never>[] }, expected: TwoGroups) {
  body.groups.forEach((g, i) => {
    expect(g.n).toBe(expected.groups[i].n);
    for (const key of ["mean", "sd", "median"] as const) expectClose(g[key], expected.groups[i][key]);
  });
  const [c] = body.comparisons as unknown as {
    harrisBoyd: { z: number; zCritical: number; sdRatio: number; verdict: string };
    lahti: { method: string; combinedLimits: { lower: number; upper: number }; subgroups: { belowLowerPercent: number; aboveUpperPercent: number }[]; verdict: string };
  }[];
  expectClose(c.harrisBoyd.z, expected.harrisBoyd.z);
  expectClose(c.harrisBoyd.zCritical, expected.harrisBoyd.zCritical);
  expectClose(c.harrisBoyd.sdRatio, expected.harrisBoyd.sdRatio);
  expect(c.harrisBoyd.verdict).toBe(expected.harrisBoyd.verdict);
  expect(c.lahti.method).toBe("empirical");
  expectClose(c.lahti.combinedLimits.lower, expected.lahti.lower);
  expectClose(c.lahti.combinedLimits.upper, expected.lahti.upper);
  [expected.lahti.first, expected.lahti.second].forEach(([below, above], i) => {
    expectClose(c.lahti.subgroups[i].belowLowerPercent, below);
    expectClose(c.lahti.subgroups[i].aboveUpperPercent, above);
  });
  expect(c.lahti.verdict).toBe(expected.lahti.verdict);
}

describe("POST /api/v1/studies/{id}/partition-assessment", () => {
  it("assesses sex: Harris-Boyd and Lahti equal R's numbers; both say partition; kept and audited", async () => {
    const before = await counts();
    const res = await send("POST", url("/partition-assessment"), "scientist", { by: "sex" });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({
      id: expect.any(String),
      by: "sex",
      bands: null,
      sex: null,
      groups: [
        { label: "F", partition: { sex: "F" } },
        { label: "M", partition: { sex: "M" } },
      ],
      comparisons: [{ between: ["F", "M"], verdict: "partition", problems: [] }],
      verdict: "partition",
      createdAt: expect.any(String),
      createdBy: { id: expect.any(String), name: demoUser("scientist").name },
    });
    checkAgainstR(body, EXPECTED.sex);
    expect(body.summary).toBe("Partitioning is supported. Harris-Boyd and Lahti both favour separate intervals for F and M.");
    expect(body.warnings).toEqual(["1 censored donor result was left out: a censored value has no number for the mean and SD."]);
    expect(await counts()).toEqual({ ...before, partition_assessments: before.partition_assessments + 1, audit_events: before.audit_events + 1 });
    const [event] = (await pool.query("SELECT action, actor_label FROM audit_events WHERE entity_id = $1", [body.id])).rows;
    expect(event).toEqual({ action: "partition-assessment.created", actor_label: demoUser("scientist").email });
  });

  it("assesses age bands: R's numbers; the methods disagree, so the verdict is undecided", async () => {
    const res = await send("POST", url("/partition-assessment"), "director", { by: "age", bands: [[18, 45], [45, 90]] });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({
      by: "age",
      bands: [[18, 45], [45, 90]],
      sex: null,
      groups: [
        { label: "age 18 to under 45", partition: { ageFrom: 18, ageTo: 45 } },
        { label: "age 45 to under 90", partition: { ageFrom: 45, ageTo: 90 } },
      ],
      comparisons: [{ between: ["age 18 to under 45", "age 45 to under 90"], verdict: "undecided" }],
      verdict: "undecided",
    });
    checkAgainstR(body, EXPECTED.age);
  });

  it("assesses age bands within one sex", async () => {
    const res = await send("POST", url("/partition-assessment"), "scientist", { by: "age", bands: [[0, 45], [45, 130]], sex: "F" });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body.sex).toBe("F");
    expect(body.groups.map((g: { label: string }) => g.label)).toEqual(["F, age 0 to under 45", "F, age 45 to under 130"]);
    expect(body.groups[0].n + body.groups[1].n).toBe(ROWS.filter((r) => r.sex === "F").length);
  });

  it("lists the assessments newest first", async () => {
    const res = await send("GET", url("/partition-assessments"), "director");
    expect(res.status).toBe(200);
    const { items } = await res.json();
    expect(items.map((a: { by: string; sex: string | null }) => [a.by, a.sex])).toEqual([
      ["age", "F"],
      ["age", null],
      ["sex", null],
    ]);
  });

  const invalid: [string, unknown, string][] = [
    ["a single band", { by: "age", bands: [[0, 18]] }, "bands: Give at least two age bands."],
    ["overlapping bands", { by: "age", bands: [[0, 18], [17, 120]] }, "bands.1: Bands must not overlap: band 2 starts at 17, band 1 ends at 18."],
    ["a gap between bands", { by: "age", bands: [[0, 18], [20, 120]] }, "bands.1: Bands must follow one another: band 2 starts at 20, band 1 ends at 18 (a gap)."],
    ["a band beyond 130 years", { by: "age", bands: [[0, 18], [18, 140]] }, "bands.1.1: A band's end is an age in years from 0 to 130."],
    ["an unknown grouping", { by: "height" }, 'by: by is "sex" or "age".'],
    ["bands for a sex assessment", { by: "sex", bands: [[0, 18], [18, 120]] }, 'Unrecognized key: "bands"'],
  ];
  for (const [what, body, detail] of invalid) {
    it(`answers 422 for ${what}, storing nothing`, async () => {
      const before = await counts();
      const res = await send("POST", url("/partition-assessment"), "scientist", body);
      expect(res.status).toBe(422);
      expect((await res.json()).detail).toContain(detail);
      expect(await counts()).toEqual(before);
    });
  }
});

describe("PUT /api/v1/studies/{id}/partition-plan", () => {
  it("stores the plan and answers the partitions it yields (sex and two bands: four)", async () => {
    const before = await counts();
    const res = await send("PUT", url("/partition-plan"), "scientist", { sex: true, ageBands: [[0, 18], [18, 120]] });
    expect(res.status).toBe(200);
    // contracts.md: sex first (F, M), then the bands in order.
    expect(await res.json()).toEqual({
      partitionPlan: { sex: true, ageBands: [[0, 18], [18, 120]] },
      partitions: [
        { sex: "F", ageFrom: 0, ageTo: 18 },
        { sex: "F", ageFrom: 18, ageTo: 120 },
        { sex: "M", ageFrom: 0, ageTo: 18 },
        { sex: "M", ageFrom: 18, ageTo: 120 },
      ],
    });
    const [row] = (await pool.query("SELECT partition_plan FROM studies WHERE id = $1", [study.id])).rows;
    expect(row.partition_plan).toEqual({ sex: true, ageBands: [[0, 18], [18, 120]] });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    const [event] = (await pool.query("SELECT action FROM audit_events WHERE entity_id = $1 ORDER BY at DESC, id DESC LIMIT 1", [study.id])).rows;
    expect(event).toEqual({ action: "study.partition-plan-set" });

    const single = await send("PUT", url("/partition-plan"), "director", { sex: false, ageBands: null });
    expect(await single.json()).toEqual({ partitionPlan: { sex: false, ageBands: null }, partitions: [{}] });
  });

  const invalid: [string, unknown, string][] = [
    ["sex that is not a boolean", { sex: "yes", ageBands: null }, "sex: sex is true or false."],
    ["overlapping bands", { sex: false, ageBands: [[0, 20], [18, 120]] }, "ageBands.1: Bands must not overlap: band 2 starts at 18, band 1 ends at 20."],
    ["a missing ageBands", { sex: true }, "ageBands:"],
  ];
  for (const [what, body, detail] of invalid) {
    it(`answers 422 for ${what}, changing nothing`, async () => {
      const before = await counts();
      const res = await send("PUT", url("/partition-plan"), "scientist", body);
      expect(res.status).toBe(422);
      expect((await res.json()).detail).toContain(detail);
      expect(await counts()).toEqual(before);
    });
  }
});

describe("roles and a closed study", () => {
  it("refuses clinicians and admins with 403 and anonymous callers with 401, changing nothing", async () => {
    const before = await counts();
    const requests: [string, string, unknown][] = [
      ["POST", "/partition-assessment", { by: "sex" }],
      ["GET", "/partition-assessments", undefined],
      ["PUT", "/partition-plan", { sex: true, ageBands: null }],
    ];
    for (const [method, tail, body] of requests) {
      for (const role of ["clinician", "admin"] as const) {
        await expectProblem(await send(method, url(tail), role, body), 403, `Your role (${role}) may not do this.`);
      }
      expect((await send(method, url(tail), null, body)).status).toBe(401);
    }
    expect(await counts()).toEqual(before);
  });

  it("answers 404 for an unknown study", async () => {
    const missing = "00000000-0000-4000-8000-000000000000";
    await expectProblem(await send("POST", url("/partition-assessment", missing), "scientist", { by: "sex" }), 404, `There is no study with the id ${missing}.`);
    await expectProblem(await send("GET", url("/partition-assessments", missing), "scientist"), 404, `There is no study with the id ${missing}.`);
    await expectProblem(await send("PUT", url("/partition-plan", missing), "scientist", { sex: true, ageBands: null }), 404, `There is no study with the id ${missing}.`);
  });

  it("answers 409 on a closed study, changing nothing; the assessments stay readable", async () => {
    const closed = await studyWithDonors(`Closed partitions ${Date.now()}`, donorCsv(ROWS.slice(0, 60)));
    await pool.query("UPDATE studies SET status = 'closed', closed_at = now() WHERE id = $1", [closed.id]);
    const before = await counts();
    await expectProblem(
      await send("POST", url("/partition-assessment", closed.id), "scientist", { by: "sex" }),
      409,
      "The study is closed: its partitions can no longer be assessed.",
    );
    await expectProblem(
      await send("PUT", url("/partition-plan", closed.id), "scientist", { sex: true, ageBands: null }),
      409,
      "The study is closed: its partitions can no longer change.",
    );
    expect(await counts()).toEqual(before);
    expect((await send("GET", url("/partition-assessments", closed.id), "scientist")).status).toBe(200);
  });
});
