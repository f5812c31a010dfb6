import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { scoreValue, scoringPartitionSchema } from "@/lib/scoring";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { MAY_WORK, ROLES, sender, signInAll, tableCounts, type Cookies } from "../support/studies";

const { pool } = testDatabase();
afterAll(() => pool.end());

const TABLES = ["adoption_checks", "interval_versions", "interval_partitions", "audit_events"];
const counts = () => tableCounts(pool, TABLES);
let cookies: Cookies;
let send: ReturnType<typeof sender>;

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/** 20 potassium values against 3.5–5.1: `below` under 3.5, `above` over 5.1, the rest inside (limits included). */
function values(below: number, above: number): number[] {
  const x = Array.from({ length: 20 }, (_, i) => Math.round((3.5 + (1.6 * i) / 19) * 100) / 100);
  for (let i = 0; i < below; i++) x[i] = 3.0 + i / 10;
  for (let i = 0; i < above; i++) x[19 - i] = 5.3 + i / 10;
  return x;
}

const SOURCE = "Manufacturer's insert, potassium reagent, lot 2026-04 (adults, serum)";
const check = (over: Doc = {}) => ({ analyte: "K", lower: 3.5, upper: 5.1, source: SOURCE, values: values(1, 1), ...over });

async function post(body: unknown, role: Role = "scientist"): Promise<Response> {
  return send("POST", "/api/v1/adoption-checks", role, body);
}

async function refused(res: Response, status: number, detail: string, before: Record<string, number>) {
  expect(res.status).toBe(status);
  expect(res.headers.get("content-type")).toBe("application/problem+json");
  expect((await res.json()).detail).toBe(detail);
  expect(await counts()).toEqual(before);
}

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
});

describe("POST /api/v1/adoption-checks", () => {
  it("accepts 2 of 20 outside, stores the values and the policy with its source, and audits the check", async () => {
    const before = await counts();
    const res = await post(check({ sex: "F" }));
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(res.headers.get("location")).toBe(`/api/v1/adoption-checks/${body.id}`);
    expect(body).toMatchObject({
      analyte: { code: "K", name: "Potassium", unit: "mmol/L", decimals: 1 },
      sex: "F",
      lower: 3.5,
      upper: 5.1,
      source: SOURCE,
      decision: "accepted",
      first: { n: 20, below: 1, above: 1, outside: 2, allowed: 2, values: values(1, 1) },
      second: null,
      createdBy: { id: expect.any(String), name: demoUser("scientist").name },
      versions: [],
    });
    // R: pbinom(2, 20, 0.05) = 0.9245163262115 (METHODS.md §7.1: 0.92452).
    expect(body.first.binomial[0].expression).toBe("P(X ≤ 2 | n = 20, p = 0.05)");
    expect(body.first.binomial[0].probability).toBeCloseTo(0.9245163262115, 12);
    expect(body.first.binomial[0].meaning).toContain("would then happen 0.925 of the time");
    // R: 1 - pbinom(4, 20, 0.05) = 0.0025739403346523 (METHODS.md §7.1: P(X ≥ 5) = 0.0026).
    expect(body.first.binomial[1]).toMatchObject({ expression: "P(X ≥ 5 | n = 20, p = 0.05)" });
    expect(body.first.binomial[1].probability).toBeCloseTo(0.0025739403346523, 12);
    expect(body.first.reasons[0]).toBe(
      "2 of 20 values (10.0%) fall outside 3.5–5.1 (1 below, 1 above); at most 2 are allowed, so the interval is verified",
    );
    expect(body.policy).toMatchObject({
      valuesPerSet: 20,
      expectedOutsideFraction: 0.05,
      firstSet: { acceptAtMost: 2, notVerifiedFrom: 5 },
      secondSet: { acceptAtMost: 2 },
      source: expect.stringContaining("CLSI EP28-A3c"),
    });
    expect(body.policy.caveats.join(" ")).toContain("uncertain");
    expect(await counts()).toEqual({ ...before, adoption_checks: before.adoption_checks + 1, audit_events: before.audit_events + 1 });
    const [row] = (await pool.query("SELECT first_values, policy, decision FROM adoption_checks WHERE id = $1", [body.id])).rows;
    expect(row.first_values).toEqual(values(1, 1));
    expect(row.policy).toEqual(body.policy);
    const [event] = (await pool.query("SELECT actor_label, action, summary FROM audit_events WHERE entity_id = $1", [body.id])).rows;
    expect(event).toEqual({
      actor_label: demoUser("scientist").email,
      action: "adoption_check.created",
      summary: "Checked K 3.5–5.1 mmol/L (F): 2 of 20 outside, accepted",
    });
  });

  it("asks for a second set with 3 or 4 outside, and shows P(X ≥ 3 | n = 20, p = 0.05)", async () => {
    const body = await (await post(check({ values: values(2, 1) }))).json();
    expect(body.decision).toBe("second_set_needed");
    const atLeast = body.first.binomial.find((b: Doc) => b.expression === "P(X ≥ 3 | n = 20, p = 0.05)");
    // R: 1 - pbinom(2, 20, 0.05) = 0.075483673788496 (METHODS.md §7.1: a right interval fails the first set with 0.0755).
    expect(atLeast.probability).toBeCloseTo(0.075483673788496, 12);
    expect(atLeast.meaning).toBe(
      "3 or more of 20 outside would happen with probability 0.0755 if the interval were right: the smaller this is, the less the interval seems to fit the local population.",
    );
    expect((await (await post(check({ values: values(0, 4) }))).json()).decision).toBe("second_set_needed");
  });

  it("does not verify 5 or more outside in the first set", async () => {
    const body = await (await post(check({ values: values(3, 2) }))).json();
    expect(body.decision).toBe("not_verified");
    expect(body.first.reasons[0]).toContain("5 or more outside in the first set means the interval is not verified");
  });

  it("checks a one-sided interval (an upper limit only) by the side it has", async () => {
    const res = await post({ analyte: "ALT", upper: 5.1, source: "Published upper reference limit", values: values(6, 2) });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({ lower: null, upper: 5.1, sex: null, decision: "accepted", first: { below: 0, above: 2, outside: 2 } });
    expect(body.first.reasons[0]).toBe("2 of 20 values (10.0%) fall above the upper limit 5.1; at most 2 are allowed, so the interval is verified");
  });

  const refusals: [string, () => Doc, string][] = [
    ["19 values", () => check({ values: values(0, 0).slice(1) }), "values: Give exactly 20 values."],
    ["21 values", () => check({ values: [...values(0, 0), 4] }), "values: Give exactly 20 values."],
    ["a value that is not a number", () => check({ values: [...values(0, 0).slice(1), "4,2"] }), "values.19: each value is a number in the analyte's unit."],
    ["lower equal to upper", () => check({ lower: 5.1 }), "lower: lower (5.1) must be below upper (5.1)."],
    ["lower above upper", () => check({ lower: 6, upper: 5 }), "lower: lower (6) must be below upper (5)."],
    ["no limit at all", () => check({ lower: null, upper: null }), "upper: Give a lower limit, an upper limit or both."],
    ["no source", () => check({ source: "  " }), "source: Say where the interval comes from (a manufacturer's insert, a publication)."],
    ["a sex other than F or M", () => check({ sex: "X" }), "sex: sex is F, M or null (both sexes)."],
    ["an unknown analyte", () => check({ analyte: "NOPE" }), "There is no analyte with the code NOPE."],
    ["an unknown field", () => check({ study: "x" }), '(root): Unrecognized key: "study"'],
  ];
  for (const [what, body, detail] of refusals) {
    it(`answers 422 for ${what}, saying so, and changes nothing`, async () => {
      const before = await counts();
      await refused(await post(body()), 422, detail, before);
    });
  }

  for (const role of ROLES.filter((r) => !MAY_WORK[r])) {
    it(`refuses the ${role} (403) and changes nothing`, async () => {
      const before = await counts();
      await refused(await post(check(), role), 403, `Your role (${role}) may not do this.`, before);
    });
  }
});

describe("POST /api/v1/adoption-checks/{id}/second-set", () => {
  it("accepts the interval when the second set has at most 2 outside, with the chance of failing both sets", async () => {
    const first = await (await post(check({ values: values(2, 2) }), "director")).json();
    expect(first.decision).toBe("second_set_needed");
    const before = await counts();
    const res = await send("POST", `/api/v1/adoption-checks/${first.id}/second-set`, "scientist", { values: values(0, 2) });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({
      id: first.id,
      decision: "accepted",
      first: { outside: 4, values: values(2, 2) },
      second: { n: 20, below: 0, above: 2, outside: 2, allowed: 2, values: values(0, 2) },
      createdBy: { name: demoUser("director").name },
    });
    const both = body.second.binomial.at(-1);
    // R: (1 - pbinom(2, 20, 0.05))^2 = 0.0056977850086081 (METHODS.md §7.1: about 0.0755² = 0.0057).
    expect(both.probability).toBeCloseTo(0.0056977850086081, 12);
    expect(both.meaning).toBe("A right interval would fail both sets with probability about 0.0057 (0.0755 for each set, the sets independent).");
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    const [event] = (await pool.query("SELECT action, summary FROM audit_events WHERE entity_id = $1 AND action = 'adoption_check.second_set'", [first.id])).rows;
    expect(event.summary).toBe("Second set for the K adoption check: 2 of 20 outside, accepted");
  });

  it("does not verify the interval when the second set has 3 or more outside", async () => {
    const first = await (await post(check({ values: values(3, 0) }))).json();
    const res = await send("POST", `/api/v1/adoption-checks/${first.id}/second-set`, "scientist", { values: values(1, 2) });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.decision).toBe("not_verified");
    expect(body.second.reasons).toContain(
      "re-examine the method and the differences between the populations, and consider establishing a local interval",
    );
    // A second set on a check that has one: 409.
    const before = await counts();
    await refused(
      await send("POST", `/api/v1/adoption-checks/${first.id}/second-set`, "scientist", { values: values(0, 0) }),
      409,
      "This adoption check already has its second set and is not verified; enter a new check to test the interval again.",
      before,
    );
  });

  it("answers 409 when the first set did not call for a second set, 404 for an unknown check, 422 for 19 values, 403 for a clinician", async () => {
    const accepted = await (await post(check())).json();
    const asked = await (await post(check({ values: values(3, 0) }))).json();
    const before = await counts();
    await refused(
      await send("POST", `/api/v1/adoption-checks/${accepted.id}/second-set`, "scientist", { values: values(0, 0) }),
      409,
      "This adoption check is accepted on its first set: a second set is taken only when the first set calls for it.",
      before,
    );
    await refused(
      await send("POST", "/api/v1/adoption-checks/00000000-0000-4000-8000-000000000000/second-set", "scientist", { values: values(0, 0) }),
      404,
      "There is no adoption check with the id 00000000-0000-4000-8000-000000000000.",
      before,
    );
    await refused(
      await send("POST", `/api/v1/adoption-checks/${asked.id}/second-set`, "scientist", { values: values(0, 0).slice(1) }),
      422,
      "values: Give exactly 20 values.",
      before,
    );
    await refused(
      await send("POST", `/api/v1/adoption-checks/${asked.id}/second-set`, "clinician", { values: values(0, 0) }),
      403,
      "Your role (clinician) may not do this.",
      before,
    );
  });
});

describe("GET /api/v1/adoption-checks", () => {
  it("lists checks newest first, by analyte and decision, and answers one by id", async () => {
    const made = await (await post({ analyte: "CA", lower: 2.15, upper: 2.55, source: "Textbook interval", values: values(0, 0).map((v) => v / 2) })).json();
    const list = await (await send("GET", "/api/v1/adoption-checks?analyte=CA", "director")).json();
    expect(list.items[0]).toEqual(made);
    expect(list.items.every((c: Doc) => c.analyte.code === "CA")).toBe(true);
    const notVerified = await (await send("GET", "/api/v1/adoption-checks?decision=not_verified", "scientist")).json();
    expect(notVerified.items.length).toBeGreaterThan(0);
    expect(notVerified.items.every((c: Doc) => c.decision === "not_verified")).toBe(true);
    const one = await send("GET", `/api/v1/adoption-checks/${made.id}`, "scientist");
    expect(one.status).toBe(200);
    expect(await one.json()).toEqual(made);
    expect((await send("GET", "/api/v1/adoption-checks/00000000-0000-4000-8000-000000000000", "scientist")).status).toBe(404);
    expect((await send("GET", "/api/v1/adoption-checks/not-a-uuid", "scientist")).status).toBe(422);
    expect((await send("GET", "/api/v1/adoption-checks?decision=maybe", "scientist")).status).toBe(422);
  });

  for (const role of ROLES) {
    it(`${MAY_WORK[role] ? "answers" : "refuses"} the ${role}`, async () => {
      const res = await send("GET", "/api/v1/adoption-checks", role);
      expect(res.status).toBe(MAY_WORK[role] ? 200 : 403);
    });
  }
});

describe("drafting an interval version from an adoption check", () => {
  it("drafts one adopted partition with the check's limits and a zlog model, and scoring gives the zlog z", async () => {
    const accepted = await (await post(check({ sex: "M" }))).json();
    const before = await counts();
    const res = await send("POST", "/api/v1/interval-versions", "scientist", { analyte: "K", adoptionCheck: accepted.id, note: "Adopted after local verification." });
    expect(res.status).toBe(201);
    const version = await res.json();
    expect(version).toMatchObject({
      state: "draft",
      analyte: { code: "K" },
      studyId: null,
      adoptionCheckId: accepted.id,
      unit: "mmol/L",
      // The analyte's critical limits (db/seed.ts: K 2.8 and 6.2).
      criticalLow: 2.8,
      criticalHigh: 6.2,
      note: "Adopted after local verification.",
      partitions: [
        { position: 1, sex: "M", ageFrom: null, ageTo: null, low: 3.5, high: 5.1, lowCi: null, highCi: null, method: "adopted", n: 20, model: { kind: "zlog", scale: "log" }, estimateId: null },
      ],
    });
    expect(await counts()).toEqual({
      ...before,
      interval_versions: before.interval_versions + 1,
      interval_partitions: before.interval_partitions + 1,
      audit_events: before.audit_events + 1,
    });
    const [row] = (await pool.query("SELECT adoption_check_id FROM interval_versions WHERE id = $1", [version.id])).rows;
    expect(row.adoption_check_id).toBe(accepted.id);
    const checked = await (await send("GET", `/api/v1/adoption-checks/${accepted.id}`, "scientist")).json();
    expect(checked.versions).toEqual([{ id: version.id, number: version.number, state: "draft" }]);

    // Scoring against the stored partition, as lib/scoring reads it.
    const [stored] = (await pool.query("SELECT low, high, model, n FROM interval_partitions WHERE version_id = $1", [version.id])).rows;
    const partition = scoringPartitionSchema.parse({ ...stored, unit: "mmol/L", decimals: 1, criticalLow: 2.8, criticalHigh: 6.2 });
    const s = scoreValue({ partition, value: 5.4 });
    // METHODS.md §10.1 (Hoffmann et al., J Lab Med 2017;41:23–32): zlog = (ln x − (ln L + ln U)/2)·3.92/(ln U − ln L);
    // by hand for 5.4 against 3.5–5.1: (1.686399 − 1.441002)·3.92/0.376478 = 2.5552;
    // R: (log(5.4) - (log(3.5) + log(5.1))/2) * 3.92 / (log(5.1) - log(3.5)) = 2.5551509449, 100 * pnorm(z) = 99.4692912084.
    expect(s.z).toBeCloseTo(2.5551509449, 9);
    expect(s.percentile).toBeCloseTo(99.4692912084, 8);
    expect(s.flag).toBe("H");
    expect(s.cautions.map((c) => c.code)).toEqual(["general", "limits-only"]);
  });

  it("drafts a flag-only partition from a one-sided check, with n counting both sets", async () => {
    const first = await (await post({ analyte: "ALT", upper: 5.1, source: "Published upper limit", values: values(0, 3) })).json();
    const accepted = await (await send("POST", `/api/v1/adoption-checks/${first.id}/second-set`, "scientist", { values: values(0, 1) })).json();
    expect(accepted.decision).toBe("accepted");
    const res = await send("POST", "/api/v1/interval-versions", "director", { analyte: "ALT", adoptionCheck: first.id, criticalHigh: 500 });
    expect(res.status).toBe(201);
    const version = await res.json();
    expect(version.partitions).toEqual([
      expect.objectContaining({ sex: null, low: null, high: 5.1, method: "adopted", n: 40, model: { kind: "limits" } }),
    ]);
    const [stored] = (await pool.query("SELECT low, high, model FROM interval_partitions WHERE version_id = $1", [version.id])).rows;
    const s = scoreValue({ partition: scoringPartitionSchema.parse({ ...stored, unit: "U/L" }), value: 7 });
    expect(s).toMatchObject({ z: null, percentile: null, flag: "H" });
    expect(s.cautions.map((c) => c.code)).toEqual(["general", "flag-only"]);
  });

  it("refuses a check that is not accepted (409), an unknown check or one of another analyte (422), mixing with a study (422), and a clinician (403)", async () => {
    const asked = await (await post(check({ values: values(3, 0) }))).json();
    const accepted = await (await post(check())).json();
    const before = await counts();
    const draft = (body: Doc, role: Role = "scientist") => send("POST", "/api/v1/interval-versions", role, body);
    await refused(
      await draft({ analyte: "K", adoptionCheck: asked.id }),
      409,
      `The adoption check ${asked.id} is waiting for its second set: only an accepted check can become a version.`,
      before,
    );
    await refused(
      await draft({ analyte: "K", adoptionCheck: "00000000-0000-4000-8000-000000000000" }),
      422,
      "There is no adoption check with the id 00000000-0000-4000-8000-000000000000.",
      before,
    );
    await refused(await draft({ analyte: "NA", adoptionCheck: accepted.id }), 422, `The adoption check ${accepted.id} is not a check of NA.`, before);
    await refused(
      await draft({ analyte: "K", adoptionCheck: accepted.id, study: "00000000-0000-4000-8000-000000000000" }),
      422,
      "study: A version drafted from an adoption check takes no study or partitions: its one partition is the check's.",
      before,
    );
    await refused(await draft({ analyte: "K" }), 422, "study: Give study and partitions, or adoptionCheck.; partitions: Give study and partitions, or adoptionCheck.", before);
    await refused(await draft({ analyte: "K", adoptionCheck: accepted.id }, "clinician"), 403, "Your role (clinician) may not do this.", before);
  });
});
