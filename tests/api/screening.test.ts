import fs from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { estimateReferenceInterval } from "@/lib/stats/estimate";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { donorCsv, FIXTURES, readFixtureRows, studyApi } from "../support/study-api";

const { pool } = testDatabase();
afterAll(() => pool.end());
const { signInAll, send, counts, studyWithDonors, expectProblem } = studyApi(pool);

/**
 * Expected proposals from base R (scripts/fixtures/screening-partitions.R, its header gives the
 * command) on tests/fixtures/estimate-gaussian-150-outlier.csv: 149 values from N(4.6, 0.4) and
 * the planted gross value 46.0 at D150 (scripts/fixtures/reference-limits.R).
 */
const EXPECTED = JSON.parse(fs.readFileSync(path.join(FIXTURES, "screening-partitions.json"), "utf8")).screen as {
  horn: string[];
  tukey: string[];
  dixonHighRatio: number;
};

const FIXTURE_ROWS = readFixtureRows("estimate-gaussian-150-outlier.csv");
/** The fixture's 150 rows and one censored result, which every screen must leave out. */
const SCREEN_CSV = donorCsv([...FIXTURE_ROWS, { code: "C001", sex: "F", age: 40, value: "<3.0" }]);

let study: { id: string; ids: Record<string, number> };
let other: { id: string; ids: Record<string, number> };
const url = (tail: string, id = study.id) => `/api/v1/studies/${id}${tail}`;

beforeAll(async () => {
  await signInAll();
  study = await studyWithDonors(`Screening ${Date.now()}`, SCREEN_CSV);
  other = await studyWithDonors(`Other ${Date.now()}`, donorCsv([{ code: "O001", sex: "M", age: 30, value: "5.0" }]));
});

/** The engine's proposals on the study's measured values in donor_results.id order, by donor code. */
async function engineProposals(rule: "horn" | "dixon" | "tukey") {
  const rows = (
    await pool.query(
      "SELECT donor_code, value FROM donor_results WHERE study_id = $1 AND censoring_side IS NULL ORDER BY id",
      [study.id],
    )
  ).rows;
  const doc = estimateReferenceInterval(
    rows.map((r) => r.value),
    { outliers: rule, screening: "propose" },
  );
  return {
    rule: doc.screening.rule,
    proposals: doc.proposed.map((p) => ({ donorCode: rows[p.index].donor_code, value: p.value, explanation: p.explanation, evidence: p.evidence })),
  };
}

describe("POST /api/v1/studies/{id}/screen", () => {
  for (const rule of ["horn", "dixon", "tukey"] as const) {
    it(`answers the ${rule} screen's proposals, equal to the engine's and to R's, and stores nothing but an audit event`, async () => {
      const before = await counts();
      const res = await send("POST", url("/screen"), "scientist", { rule });
      expect(res.status).toBe(200);
      const body = await res.json();
      expect(body).toMatchObject({ rule, ruleApplied: rule, partition: {}, n: 150, censored: 1 });
      expect(body.warnings).toContain("1 censored donor result was left out of the screen: a censored value has no number to test.");
      const codes = body.proposals.map((p: { donorCode: string }) => p.donorCode);
      if (rule === "dixon") {
        expect(codes).toEqual(["D150"]);
        // R: (46.0 - second largest) / (46.0 - smallest), the D/R of the largest value.
        expect(body.proposals[0].evidence.ratio).toBeCloseTo(EXPECTED.dixonHighRatio, 12);
      } else {
        expect(codes).toEqual(EXPECTED[rule]);
      }
      const engine = await engineProposals(rule);
      expect(engine.rule).toBe(body.ruleApplied);
      expect(body.proposals.map((p: Record<string, unknown>) => ({ donorCode: p.donorCode, value: p.value, explanation: p.explanation, evidence: p.evidence }))).toEqual(
        engine.proposals,
      );
      for (const p of body.proposals) {
        expect(p).toEqual({
          donorResultId: study.ids[p.donorCode],
          donorCode: p.donorCode,
          sex: expect.stringMatching(/^[FM]$/),
          ageYears: expect.any(Number),
          value: expect.any(Number),
          explanation: expect.any(String),
          evidence: expect.objectContaining({ rule }),
          decision: null,
        });
      }
      expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
      const [event] = (await pool.query("SELECT action, actor_label FROM audit_events WHERE entity_id = $1 ORDER BY at DESC, id DESC LIMIT 1", [study.id])).rows;
      expect(event).toEqual({ action: "study.screened", actor_label: demoUser("scientist").email });
    });
  }

  it("screens one partition: only its donor results", async () => {
    const res = await send("POST", url("/screen"), "director", { rule: "tukey", partition: { sex: "M" } });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.partition).toEqual({ sex: "M" });
    expect(body.n).toBe(FIXTURE_ROWS.filter((r) => r.sex === "M").length);
    expect(body.censored).toBe(0);
    for (const p of body.proposals) expect(p.sex).toBe("M");
  });

  it("falls back from Horn to Tukey on the raw scale when a value is not positive, and says so", async () => {
    const rows = Array.from({ length: 30 }, (_, i) => ({ code: `Z${i}`, sex: "F", age: 30, value: String(i === 0 ? 0 : 4 + (i % 7) / 10) }));
    const zero = await studyWithDonors(`Zero ${Date.now()}`, donorCsv(rows));
    const res = await send("POST", url("/screen", zero.id), "scientist", { rule: "horn" });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ rule: "horn", ruleApplied: "tukey", n: 30 });
    expect(body.warnings).toContain("Horn's method needs positive values; Tukey fences on the raw scale were used instead.");
    // R: x <- c(0, 4 + (1:29 %% 7)/10); quantile(x, c(.25, .75), type = 7) gives 4.1 and 4.475, fences
    // 3.5375 and 5.0375: only the 0 (Z0) lies outside.
    expect(body.proposals.map((p: { donorCode: string }) => p.donorCode)).toEqual(["Z0"]);
  });

  const invalid: [string, unknown, string][] = [
    ["an unknown rule", { rule: "grubbs" }, 'rule: rule is "horn", "dixon" or "tukey".'],
    ["a partition with another sex code", { rule: "horn", partition: { sex: "X" } }, "partition.sex: sex is F or M."],
    ["an empty age range", { rule: "horn", partition: { ageFrom: 40, ageTo: 20 } }, "partition.ageTo: ageFrom must be below ageTo (the range is [ageFrom, ageTo))."],
  ];
  for (const [what, body, detail] of invalid) {
    it(`answers 422 for ${what} and stores nothing`, async () => {
      const before = await counts();
      await expectProblem(await send("POST", url("/screen"), "scientist", body), 422, detail);
      expect(await counts()).toEqual(before);
    });
  }

  it("answers 404 for an unknown study, 403 for clinicians and admins, 401 anonymously, storing nothing", async () => {
    const before = await counts();
    const missing = "00000000-0000-4000-8000-000000000000";
    await expectProblem(await send("POST", url("/screen", missing), "scientist", { rule: "horn" }), 404, `There is no study with the id ${missing}.`);
    for (const role of ["clinician", "admin"] as const) {
      await expectProblem(await send("POST", url("/screen"), role, { rule: "horn" }), 403, `Your role (${role}) may not do this.`);
    }
    expect((await send("POST", url("/screen"), null, { rule: "horn" })).status).toBe(401);
    expect(await counts()).toEqual(before);
  });
});

describe("outlier decisions", () => {
  let excludeDecision: { id: string; exclusionId: string };

  it("keeps a proposal with a reason: no exclusion, audited, shown on the next screen", async () => {
    const before = await counts();
    const res = await send("POST", url("/outlier-decisions"), "scientist", {
      donorResultId: study.ids.D013,
      decision: "keep",
      reason: "Within this donor's usual range on recall.",
    });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({
      donorResultId: study.ids.D013,
      decision: "keep",
      rule: "horn",
      reason: "Within this donor's usual range on recall.",
      exclusionId: null,
      evidence: { proposed: true, ruleAsked: "horn", ruleApplied: "horn", partition: {}, n: 150, explanation: expect.any(String), statistic: expect.objectContaining({ rule: "horn" }) },
    });
    expect(new Date(body.decidedAt).getTime()).not.toBeNaN();
    expect(await counts()).toEqual({ ...before, outlier_decisions: before.outlier_decisions + 1, audit_events: before.audit_events + 1 });
    const [event] = (await pool.query("SELECT action FROM audit_events WHERE entity_id = $1", [body.id])).rows;
    expect(event).toEqual({ action: "outlier-decision.created" });

    const screen = await (await send("POST", url("/screen"), "scientist", { rule: "horn" })).json();
    const proposal = screen.proposals.find((p: { donorCode: string }) => p.donorCode === "D013");
    expect(proposal.decision).toEqual({ id: body.id, decision: "keep", reason: "Within this donor's usual range on recall.", decidedAt: body.decidedAt });
  });

  it("excludes a proposal: the decision and its exclusion (source outlier) in one go, audited", async () => {
    const before = await counts();
    const res = await send("POST", url("/outlier-decisions"), "director", {
      donorResultId: study.ids.D150,
      decision: "exclude",
      reason: "Gross error: 46.0 keyed for 4.60.",
      rule: "dixon",
    });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({ donorResultId: study.ids.D150, decision: "exclude", rule: "dixon", exclusionId: expect.any(String) });
    expect(body.evidence.statistic).toMatchObject({ rule: "dixon", side: "high" });
    excludeDecision = body;
    expect(await counts()).toEqual({
      ...before,
      outlier_decisions: before.outlier_decisions + 1,
      exclusions: before.exclusions + 1,
      audit_events: before.audit_events + 1,
    });
    const [exclusion] = (await pool.query("SELECT source, rule, reason, donor_result_id FROM exclusions WHERE id = $1", [body.exclusionId])).rows;
    expect(exclusion).toEqual({ source: "outlier", rule: "dixon", reason: "Gross error: 46.0 keyed for 4.60.", donor_result_id: String(study.ids.D150) });

    const screen = await (await send("POST", url("/screen"), "scientist", { rule: "dixon" })).json();
    expect(screen.n).toBe(149);
    expect(screen.proposals.map((p: { donorCode: string }) => p.donorCode)).not.toContain("D150");

    const listed = await (await send("GET", url("/donor-results?excluded=true"), "scientist")).json();
    expect(listed.total).toBe(1);
    expect(listed.items[0]).toMatchObject({
      donorCode: "D150",
      excluded: true,
      exclusion: { id: body.exclusionId, source: "outlier", reason: "Gross error: 46.0 keyed for 4.60." },
    });
    const included = await (await send("GET", url("/donor-results?excluded=false&pageSize=500"), "scientist")).json();
    expect(included.total).toBe(150);
    expect(included.items.every((i: { excluded: boolean; exclusion: unknown }) => !i.excluded && i.exclusion === null)).toBe(true);
  });

  it("lists the decisions in effect, newest first", async () => {
    const res = await send("GET", url("/outlier-decisions"), "scientist");
    expect(res.status).toBe(200);
    const { items } = await res.json();
    expect(items.map((d: { donorCode: string; decision: string }) => [d.donorCode, d.decision])).toEqual([
      ["D150", "exclude"],
      ["D013", "keep"],
    ]);
    expect(items[0]).toMatchObject({ decidedBy: { id: expect.any(String), name: expect.any(String) }, undoneAt: null });
  });

  const refusals: [string, () => Record<string, unknown>, () => string | undefined, number, () => string][] = [
    [
      "a second decision on a donor result that has one in effect",
      () => ({ donorResultId: study.ids.D013, decision: "exclude", reason: "Changed my mind." }),
      () => undefined,
      409,
      () => `Donor result ${study.ids.D013} (D013) already has a decision in effect ("keep", ${keepId}); undo it first.`,
    ],
    [
      "a donor result of another study",
      () => ({ donorResultId: other.ids.O001, decision: "keep", reason: "x" }),
      () => undefined,
      422,
      () => `Donor result ${other.ids.O001} is not in this study.`,
    ],
    [
      "an unknown donor result",
      () => ({ donorResultId: 999_999_999, decision: "keep", reason: "x" }),
      () => undefined,
      422,
      () => "Donor result 999999999 is not in this study.",
    ],
    [
      "a blank reason",
      () => ({ donorResultId: study.ids.D094, decision: "keep", reason: "   " }),
      () => undefined,
      422,
      () => "reason: Give a reason: every decision and exclusion keeps one.",
    ],
    [
      "an unknown decision",
      () => ({ donorResultId: study.ids.D094, decision: "maybe", reason: "x" }),
      () => undefined,
      422,
      () => 'decision: decision is "exclude" or "keep".',
    ],
  ];
  let keepId = "";
  for (const [what, body, , status, detail] of refusals) {
    it(`answers ${status} for ${what}, changing nothing`, async () => {
      keepId = (await pool.query("SELECT id FROM outlier_decisions WHERE donor_result_id = $1 AND undone_at IS NULL", [study.ids.D013])).rows[0]?.id;
      const before = await counts();
      await expectProblem(await send("POST", url("/outlier-decisions"), "scientist", body()), status, detail());
      expect(await counts()).toEqual(before);
    });
  }

  it("refuses to exclude by decision a donor result that already has an exclusion in effect", async () => {
    const manual = await send("POST", url("/exclusions"), "scientist", { donorResultIds: [study.ids.D094], reason: "Haemolysed sample." });
    expect(manual.status).toBe(201);
    const before = await counts();
    await expectProblem(
      await send("POST", url("/outlier-decisions"), "scientist", { donorResultId: study.ids.D094, decision: "exclude", reason: "Outlier." }),
      409,
      `Donor result ${study.ids.D094} (D094) already has an exclusion in effect; nothing was excluded.`,
    );
    expect(await counts()).toEqual(before);
  });

  it("undoes a decision and its exclusion in one transaction; undoing twice is 409", async () => {
    const before = await counts();
    const res = await send("DELETE", url(`/outlier-decisions/${excludeDecision.id}`), "scientist");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toEqual({ id: excludeDecision.id, undoneAt: expect.any(String), exclusionId: excludeDecision.exclusionId });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    const [exclusion] = (await pool.query("SELECT undone_at FROM exclusions WHERE id = $1", [excludeDecision.exclusionId])).rows;
    expect(exclusion.undone_at.toISOString()).toBe(body.undoneAt);
    const [event] = (await pool.query("SELECT action FROM audit_events WHERE entity_id = $1 ORDER BY at DESC LIMIT 1", [excludeDecision.id])).rows;
    expect(event).toEqual({ action: "outlier-decision.undone" });

    const all = await (await send("GET", url("/outlier-decisions?all=true"), "scientist")).json();
    expect(all.items.find((d: { id: string }) => d.id === excludeDecision.id).undoneAt).toBe(body.undoneAt);
    const inEffect = await (await send("GET", url("/outlier-decisions"), "scientist")).json();
    expect(inEffect.items.map((d: { id: string }) => d.id)).not.toContain(excludeDecision.id);

    const again = await counts();
    await expectProblem(await send("DELETE", url(`/outlier-decisions/${excludeDecision.id}`), "scientist"), 409, `The outlier decision was already undone at ${body.undoneAt}.`);
    const missing = "00000000-0000-4000-8000-000000000000";
    await expectProblem(await send("DELETE", url(`/outlier-decisions/${missing}`), "scientist"), 404, `There is no outlier decision with the id ${missing} in this study.`);
    expect(await counts()).toEqual(again);
  });

  it("lets one of two simultaneous decisions on a donor result through; the other is 409", async () => {
    const body = { donorResultId: study.ids.D119, decision: "exclude", reason: "Simultaneous." };
    const answers = await Promise.all([send("POST", url("/outlier-decisions"), "scientist", body), send("POST", url("/outlier-decisions"), "director", body)]);
    expect(answers.map((r) => r.status).sort()).toEqual([201, 409]);
    const loser = answers.find((r) => r.status === 409)!;
    // Which check stops the second depends on when the first commits: the decision or the
    // exclusion seen in effect, or the partial unique index itself.
    expect((await loser.json()).detail).toMatch(
      /^(Donor result \d+ \(D119\) already has (a decision|an exclusion) in effect|Another (decision|exclusion) .* took effect at the same moment)/,
    );
    const rows = (await pool.query("SELECT count(*)::int AS n FROM outlier_decisions WHERE donor_result_id = $1 AND undone_at IS NULL", [study.ids.D119])).rows;
    expect(rows[0].n).toBe(1);
  });
});

/**
 * Holds an uncommitted row in another transaction while the request runs: the request's own
 * checks cannot see it, so the partial unique index is what stops the request, once the row
 * commits. Waits until the request's statement is blocked on that row's lock.
 */
async function raceAgainstUncommitted(insert: { text: string; values: unknown[] }, request: () => Promise<Response>) {
  const client = await pool.connect();
  try {
    await client.query("BEGIN");
    await client.query(insert.text, insert.values);
    const pending = request();
    for (let i = 0; i < 200; i++) {
      const waiting = await pool.query(
        "SELECT count(*)::int AS n FROM pg_stat_activity WHERE wait_event_type = 'Lock' AND query ILIKE '%insert into%'",
      );
      if (waiting.rows[0].n > 0) break;
      await new Promise((r) => setTimeout(r, 25));
    }
    await client.query("COMMIT");
    return await pending;
  } finally {
    client.release();
  }
}

describe("the partial unique indexes under concurrency", () => {
  it("answers 409 when another exclusion of the donor result commits while the request is under way", async () => {
    const before = await counts();
    const res = await raceAgainstUncommitted(
      {
        text: "INSERT INTO exclusions (study_id, donor_result_id, source, reason) VALUES ($1, $2, 'manual', 'held')",
        values: [study.id, study.ids.D030],
      },
      () => send("POST", url("/exclusions"), "scientist", { donorResultIds: [study.ids.D030], reason: "Racing." }),
    );
    await expectProblem(
      res,
      409,
      "Another exclusion of one of these donor results took effect at the same moment; nothing was stored. Reload and look again.",
    );
    expect(await counts()).toEqual({ ...before, exclusions: before.exclusions + 1 });
  });

  it("answers 409 when another decision on the donor result commits while the request is under way", async () => {
    const before = await counts();
    const res = await raceAgainstUncommitted(
      {
        text: "INSERT INTO outlier_decisions (study_id, donor_result_id, decision, rule, reason) VALUES ($1, $2, 'keep', 'horn', 'held')",
        values: [study.id, study.ids.D031],
      },
      () => send("POST", url("/outlier-decisions"), "scientist", { donorResultId: study.ids.D031, decision: "keep", reason: "Racing." }),
    );
    await expectProblem(
      res,
      409,
      "Another decision on this donor result took effect at the same moment; nothing was stored. Reload and look again.",
    );
    expect(await counts()).toEqual({ ...before, outlier_decisions: before.outlier_decisions + 1 });
  });
});

describe("manual exclusions", () => {
  let created: { id: string; donorResultId: number }[];

  it("excludes several donor results with one reason, all audited in one event", async () => {
    const before = await counts();
    const ids = [study.ids.D001, study.ids.D002];
    const res = await send("POST", url("/exclusions"), "scientist", { donorResultIds: ids, reason: "  Non-fasting on the questionnaire. " });
    expect(res.status).toBe(201);
    const { items } = await res.json();
    created = items;
    expect(items).toHaveLength(2);
    const d001 = FIXTURE_ROWS[0];
    expect(items.find((i: { donorCode: string }) => i.donorCode === "D001")).toEqual({
      id: expect.any(String),
      donorResultId: study.ids.D001,
      donorCode: "D001",
      sex: d001.sex,
      ageYears: d001.age,
      value: Number(d001.value),
      source: "manual",
      rule: null,
      reason: "Non-fasting on the questionnaire.",
      createdAt: expect.any(String),
      createdBy: { id: expect.any(String), name: demoUser("scientist").name },
      undoneAt: null,
      undoneBy: null,
    });
    expect(await counts()).toEqual({ ...before, exclusions: before.exclusions + 2, audit_events: before.audit_events + 1 });
    const [event] = (await pool.query("SELECT action, details FROM audit_events WHERE entity_id = $1 ORDER BY at DESC, id DESC LIMIT 1", [study.id])).rows;
    expect(event.action).toBe("exclusion.created");
    expect(event.details.exclusions).toHaveLength(2);
  });

  const refusals: [string, () => unknown, number, () => string][] = [
    [
      "a donor result already excluded, among others (all or nothing)",
      () => ({ donorResultIds: [study.ids.D003, study.ids.D001], reason: "Again." }),
      409,
      () => `Donor result ${study.ids.D001} (D001) already has an exclusion in effect; nothing was excluded.`,
    ],
    [
      "a donor result of another study",
      () => ({ donorResultIds: [study.ids.D003, other.ids.O001], reason: "x" }),
      422,
      () => `Donor result ${other.ids.O001} is not in this study.`,
    ],
    ["the same id twice", () => ({ donorResultIds: [study.ids.D003, study.ids.D003], reason: "x" }), 422, () => `donorResultIds: Donor result ${study.ids.D003} is listed twice.`],
    ["no ids", () => ({ donorResultIds: [], reason: "x" }), 422, () => "donorResultIds: Give at least one donor result id."],
    ["a blank reason", () => ({ donorResultIds: [study.ids.D003], reason: "" }), 422, () => "reason: Give a reason: every decision and exclusion keeps one."],
    [
      "more than 10,000 ids",
      () => ({ donorResultIds: Array.from({ length: 10_001 }, (_, i) => i + 1), reason: "x" }),
      422,
      () => "donorResultIds: Give at most 10,000 donor result ids at a time.",
    ],
  ];
  for (const [what, body, status, detail] of refusals) {
    it(`answers ${status} for ${what}, changing nothing`, async () => {
      const before = await counts();
      await expectProblem(await send("POST", url("/exclusions"), "scientist", body()), status, detail());
      expect(await counts()).toEqual(before);
    });
  }

  it("lists the exclusions in effect, and with all=true the undone ones", async () => {
    const { items } = await (await send("GET", url("/exclusions"), "director")).json();
    const codes = items.map((i: { donorCode: string }) => i.donorCode).sort();
    expect(codes).toEqual(expect.arrayContaining(["D001", "D002", "D094"]));
    expect(codes).not.toContain("D150");
    const all = await (await send("GET", url("/exclusions?all=true"), "director")).json();
    const undone = all.items.find((i: { donorCode: string }) => i.donorCode === "D150");
    expect(undone).toMatchObject({ source: "outlier", rule: "dixon", undoneAt: expect.any(String), undoneBy: { id: expect.any(String) } });
  });

  it("undoes an exclusion once; the second time is 409; an unknown one 404", async () => {
    const target = created[0];
    const before = await counts();
    const res = await send("DELETE", url(`/exclusions/${target.id}`), "director");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toEqual({ id: target.id, undoneAt: expect.any(String), outlierDecisionId: null });
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    const [event] = (await pool.query("SELECT action FROM audit_events WHERE entity_id = $1", [target.id])).rows;
    expect(event).toEqual({ action: "exclusion.undone" });
    const again = await counts();
    await expectProblem(await send("DELETE", url(`/exclusions/${target.id}`), "director"), 409, `The exclusion was already undone at ${body.undoneAt}.`);
    const missing = "00000000-0000-4000-8000-000000000000";
    await expectProblem(await send("DELETE", url(`/exclusions/${missing}`), "director"), 404, `There is no exclusion with the id ${missing} in this study.`);
    await expectProblem(await send("DELETE", url(`/exclusions/${target.id}`, other.id), "director"), 404, `There is no exclusion with the id ${target.id} in this study.`);
    expect(await counts()).toEqual(again);
  });

  it("undoing an exclusion that an outlier decision made undoes the decision too", async () => {
    const decided = await (
      await send("POST", url("/outlier-decisions"), "scientist", { donorResultId: study.ids.D145, decision: "exclude", reason: "Confirmed outlier." })
    ).json();
    const res = await send("DELETE", url(`/exclusions/${decided.exclusionId}`), "scientist");
    expect(res.status).toBe(200);
    expect((await res.json()).outlierDecisionId).toBe(decided.id);
    const [row] = (await pool.query("SELECT undone_at FROM outlier_decisions WHERE id = $1", [decided.id])).rows;
    expect(row.undone_at).not.toBeNull();
  });

  it("lets one of two simultaneous exclusions of a donor result through; the other is 409", async () => {
    const body = { donorResultIds: [study.ids.D010], reason: "Simultaneous." };
    const answers = await Promise.all([send("POST", url("/exclusions"), "scientist", body), send("POST", url("/exclusions"), "director", body)]);
    expect(answers.map((r) => r.status).sort()).toEqual([201, 409]);
    const rows = (await pool.query("SELECT count(*)::int AS n FROM exclusions WHERE donor_result_id = $1 AND undone_at IS NULL", [study.ids.D010])).rows;
    expect(rows[0].n).toBe(1);
  });
});

describe("roles and a closed study", () => {
  it("refuses clinicians and admins with 403 and anonymous callers with 401 on every screening route, changing nothing", async () => {
    const before = await counts();
    const someId = "00000000-0000-4000-8000-000000000000";
    const requests: [string, string, unknown][] = [
      ["GET", "/outlier-decisions", undefined],
      ["POST", "/outlier-decisions", { donorResultId: study.ids.D020, decision: "keep", reason: "x" }],
      ["DELETE", `/outlier-decisions/${someId}`, undefined],
      ["GET", "/exclusions", undefined],
      ["POST", "/exclusions", { donorResultIds: [study.ids.D020], reason: "x" }],
      ["DELETE", `/exclusions/${someId}`, undefined],
      ["GET", "/donor-results?excluded=true", undefined],
    ];
    for (const [method, tail, body] of requests) {
      for (const role of ["clinician", "admin"] as const) {
        await expectProblem(await send(method, url(tail), role, body), 403, `Your role (${role}) may not do this.`);
      }
      expect((await send(method, url(tail), null, body)).status).toBe(401);
    }
    expect(await counts()).toEqual(before);
  });

  it("answers 409 to every write on a closed study, changing nothing; reading and screening still work", async () => {
    const closed = await studyWithDonors(`Closed ${Date.now()}`, donorCsv(FIXTURE_ROWS.slice(0, 40)));
    const excluded = await (await send("POST", url("/exclusions", closed.id), "scientist", { donorResultIds: [closed.ids.D001], reason: "Before closing." })).json();
    const decided = await (
      await send("POST", url("/outlier-decisions", closed.id), "scientist", { donorResultId: closed.ids.D002, decision: "keep", reason: "Before closing." })
    ).json();
    await pool.query("UPDATE studies SET status = 'closed', closed_at = now() WHERE id = $1", [closed.id]);
    const before = await counts();
    const writes: [string, string, unknown, string][] = [
      ["POST", "/exclusions", { donorResultIds: [closed.ids.D003], reason: "x" }, "The study is closed: its donor results can no longer be excluded."],
      ["DELETE", `/exclusions/${excluded.items[0].id}`, undefined, "The study is closed: its exclusions can no longer be undone."],
      ["POST", "/outlier-decisions", { donorResultId: closed.ids.D003, decision: "exclude", reason: "x" }, "The study is closed: its outlier decisions can no longer change."],
      ["DELETE", `/outlier-decisions/${decided.id}`, undefined, "The study is closed: its outlier decisions can no longer change."],
    ];
    for (const [method, tail, body, detail] of writes) {
      await expectProblem(await send(method, url(tail, closed.id), "scientist", body), 409, detail);
    }
    expect(await counts()).toEqual(before);
    expect((await send("GET", url("/exclusions", closed.id), "scientist")).status).toBe(200);
    expect((await send("POST", url("/screen", closed.id), "scientist", { rule: "horn" })).status).toBe(200);
  });
});
