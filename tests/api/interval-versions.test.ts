import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { donorCsv, generatedRows, openStudy, sender, signInAll, tableCounts, uploadAndCommit, type Cookies } from "../support/studies";

const { pool } = testDatabase();
afterAll(() => pool.end());

const TABLES = ["analytes", "estimates", "interval_versions", "interval_partitions", "audit_events"];
const counts = () => tableCounts(pool, TABLES);
let cookies: Cookies;
let send: ReturnType<typeof sender>;

type Doc = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/** 200 donors, sexes alternating: 100 women and 100 men (generatedRows). */
const ROWS = generatedRows(200, 31);
let studyId: string;
/** Estimates: everyone (n = 200: no robust limits above 119 values), women, men, and two age bands. */
const est = {} as Record<"all" | "women" | "men" | "young" | "older", Doc>;

async function estimate(body: unknown): Promise<Doc> {
  const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", body);
  expect(res.status).toBe(201);
  return res.json();
}

async function draft(body: Doc, role: Role = "scientist"): Promise<Response> {
  return send("POST", "/api/v1/interval-versions", role, body);
}

async function nextNumber(code: string): Promise<number> {
  const { rows } = await pool.query("SELECT coalesce(max(v.number), 0) + 1 AS n FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE a.code = $1", [code]);
  return rows[0].n;
}

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  studyId = await openStudy(send, "Glucose for drafting");
  await uploadAndCommit(cookies, studyId, donorCsv(ROWS));
  est.all = await estimate({ outliers: "none", seed: 4 });
  est.women = await estimate({ partition: { sex: "F" }, outliers: "none", transform: "box-cox", seed: 4 });
  est.men = await estimate({ partition: { sex: "M" }, outliers: "none", seed: 4 });
  est.young = await estimate({ partition: { ageFrom: 18, ageTo: 50 }, outliers: "none" });
  est.older = await estimate({ partition: { ageFrom: 50, ageTo: 80 }, outliers: "none" });
});

describe("POST /api/v1/interval-versions", () => {
  it("drafts a version numbered next for the analyte, with limits, CIs, n and models, and audits it", async () => {
    const number = await nextNumber("GLU");
    const before = await counts();
    const res = await draft({
      analyte: "GLU",
      study: studyId,
      partitions: [
        { estimate: est.women.id, method: "nonparametric" },
        { estimate: est.men.id, method: "robust" },
      ],
      note: "Local adult population, 2026.",
    });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(res.headers.get("location")).toBe(`/api/v1/interval-versions/${body.id}`);
    const np = est.women.nonparametric;
    const rb = est.men.robust;
    expect(body).toEqual({
      id: expect.any(String),
      number,
      state: "draft",
      analyte: { code: "GLU", name: "Glucose" },
      studyId,
      adoptionCheckId: null,
      unit: "mmol/L",
      decimals: 1,
      // The analyte's default critical limits (db/seed.ts: GLU 2.5 and 25).
      criticalLow: 2.5,
      criticalHigh: 25,
      note: "Local adult population, 2026.",
      returnComment: null,
      createdAt: expect.any(String),
      createdBy: { id: expect.any(String), name: demoUser("scientist").name },
      updatedAt: expect.any(String),
      submittedAt: null,
      submittedBy: null,
      returnedAt: null,
      returnedBy: null,
      effectiveFrom: null,
      effectiveTo: null,
      reviewBy: null,
      withdrawnAt: null,
      withdrawnBy: null,
      withdrawnReason: null,
      signatures: [],
      partitions: [
        {
          id: expect.any(String), position: 1, sex: "F", ageFrom: null, ageTo: null, ageFromDays: null, ageToDays: null,
          low: np.lower, high: np.upper, lowCi: np.lowerCi, highCi: np.upperCi, method: "nonparametric", n: 100,
          model: { kind: "empirical", n: 100 }, estimateId: est.women.id,
        },
        {
          id: expect.any(String), position: 2, sex: "M", ageFrom: null, ageTo: null, ageFromDays: null, ageToDays: null,
          low: rb.lower, high: rb.upper, lowCi: rb.lowerCi, highCi: rb.upperCi, method: "robust", n: 100,
          model: { kind: "gaussian", transform: est.men.parametric.transform, ...(est.men.parametric.lambda === null ? {} : { lambda: est.men.parametric.lambda }), mean: expect.any(Number), sd: expect.any(Number) },
          estimateId: est.men.id,
        },
      ],
    });
    expect(await counts()).toEqual({
      ...before,
      interval_versions: before.interval_versions + 1,
      interval_partitions: before.interval_partitions + 2,
      audit_events: before.audit_events + 1,
    });
    const [event] = (await pool.query("SELECT actor_label, action, entity_type, details FROM audit_events WHERE entity_id = $1", [body.id])).rows;
    expect(event).toMatchObject({
      actor_label: demoUser("scientist").email,
      action: "interval_version.created",
      entity_type: "interval_version",
      details: { analyte: "GLU", number, studyId },
    });
    // The empirical model keeps the women's 100 values, sorted, on the server only.
    const stored = (await pool.query("SELECT model FROM interval_partitions WHERE version_id = $1 AND position = 1", [body.id])).rows[0].model;
    const women = ROWS.filter((r) => r.sex === "F").map((r) => Number(r.value)).sort((a, b) => a - b);
    expect(stored).toEqual({ kind: "empirical", values: women });
    expect(JSON.stringify(body)).not.toContain('"values"');
    expect(JSON.stringify(event.details)).not.toContain('"values"');
  });

  it("stores the parametric model the estimate fitted, and age bands in days by Math.round(years × 365.25)", async () => {
    const res = await draft({
      analyte: "GLU",
      study: studyId,
      partitions: [
        { estimate: est.young.id, method: "parametric" },
        { estimate: est.older.id, method: "parametric" },
      ],
      criticalLow: null,
      criticalHigh: 30,
    });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({ criticalLow: null, criticalHigh: 30 });
    const p = est.young.parametric;
    expect(body.partitions[0]).toMatchObject({
      ageFrom: 18, ageTo: 50,
      // 18 × 365.25 = 6574.5 → 6575; 50 × 365.25 = 18262.5 → 18263; 80 × 365.25 = 29220 (by hand).
      ageFromDays: 6575, ageToDays: 18263,
      low: p.lower, high: p.upper, method: "parametric",
      model: { kind: "gaussian", transform: p.transform, ...(p.lambda === null ? {} : { lambda: p.lambda }), mean: p.mean, sd: p.sd },
    });
    expect(body.partitions[1]).toMatchObject({ ageFrom: 50, ageTo: 80, ageFromDays: 18263, ageToDays: 29220 });
  });

  it("numbers drafts drafted at the same moment one after another", async () => {
    const number = await nextNumber("GLU");
    const body = { analyte: "GLU", study: studyId, partitions: [{ estimate: est.all.id, method: "nonparametric" }] };
    const answers = await Promise.all([draft(body), draft(body, "director"), draft(body)]);
    const docs = await Promise.all(answers.map((r) => r.json()));
    expect(answers.map((r) => r.status)).toEqual([201, 201, 201]);
    expect(docs.map((d) => d.number).sort((a, b) => a - b)).toEqual([number, number + 1, number + 2]);
  });

  const refusals: [string, () => Doc, string][] = [
    ["an unknown estimate", () => ({ partitions: [{ estimate: "00000000-0000-4000-8000-000000000000", method: "parametric" }] }),
      `partitions.0.estimate: there is no estimate with the id 00000000-0000-4000-8000-000000000000 in the study STUDY.`],
    ["overlapping partitions", () => ({ partitions: [{ estimate: est.women.id, method: "parametric" }, { estimate: est.all.id, method: "parametric" }] }),
      "partitions.0 (F) and partitions.1 (All donors) overlap: each patient must fall in one partition only."],
    ["the same estimate twice", () => ({ partitions: [{ estimate: est.men.id, method: "parametric" }, { estimate: est.men.id, method: "robust" }] }),
      "partitions.0 (M) and partitions.1 (M) overlap: each patient must fall in one partition only."],
    ["a method without limits in that estimate", () => ({ partitions: [{ estimate: est.all.id, method: "robust" }] }),
      `partitions.0.method: the estimate ALL has no robust limits; choose a method that gave both limits.`],
    ["an unknown method", () => ({ partitions: [{ estimate: est.all.id, method: "bayesian" }] }), "partitions.0.method: method is nonparametric, parametric or robust (limits per partition), lms (age curves) or indirect (routine results)."],
    ["no partitions", () => ({ partitions: [] }), "partitions: Give at least one partition."],
    ["an unknown analyte", () => ({ analyte: "NOPE" }), "There is no analyte with the code NOPE."],
    ["a study of another analyte", () => ({ analyte: "K" }), 'The study "Glucose for drafting" is not a study of K.'],
    ["a critical low above the low limit", () => ({ criticalLow: 4.5 }), `criticalLow (4.5) must not exceed the low limit of partitions.0 (LOW).`],
    ["critical limits the wrong way round", () => ({ criticalLow: 3, criticalHigh: 2 }), "criticalLow (3) must be below criticalHigh (2)."],
  ];
  for (const [what, change, detail] of refusals) {
    it(`answers 422 for ${what}, saying so, and changes nothing`, async () => {
      const before = await counts();
      const res = await draft({ analyte: "GLU", study: studyId, partitions: [{ estimate: est.women.id, method: "parametric" }], ...change() });
      expect(res.status).toBe(422);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      const expected = detail.replace("STUDY", studyId).replace("ALL", est.all.id).replace("LOW", String(est.women.parametric.lower));
      expect((await res.json()).detail).toBe(expected);
      expect(await counts()).toEqual(before);
    });
  }

  it("answers 422 for an estimate of another study and changes nothing", async () => {
    const other = await openStudy(send, "Another glucose study for drafting");
    const before = await counts();
    const res = await draft({ analyte: "GLU", study: other, partitions: [{ estimate: est.women.id, method: "parametric" }] });
    expect(res.status).toBe(422);
    expect((await res.json()).detail).toBe(`partitions.0.estimate: there is no estimate with the id ${est.women.id} in the study ${other}.`);
    expect(await counts()).toEqual(before);
  });
});

describe("GET and PATCH /api/v1/interval-versions", () => {
  let version: Doc;
  beforeAll(async () => {
    version = await (await draft({ analyte: "GLU", study: studyId, partitions: [{ estimate: est.all.id, method: "parametric" }] })).json();
  });

  it("answers one version as drafted, and lists versions by analyte and state", async () => {
    const one = await send("GET", `/api/v1/interval-versions/${version.id}`, "director");
    expect(one.status).toBe(200);
    expect(await one.json()).toEqual(version);
    const drafts = await (await send("GET", "/api/v1/interval-versions?analyte=glu&state=draft", "scientist")).json();
    expect(drafts.items.map((v: Doc) => v.id)).toContain(version.id);
    expect(drafts.items.every((v: Doc) => v.state === "draft" && v.analyte.code === "GLU")).toBe(true);
    const inForce = await (await send("GET", "/api/v1/interval-versions?analyte=GLU&state=in_force", "scientist")).json();
    expect(inForce.items.map((v: Doc) => v.id)).not.toContain(version.id);
    const bad = await send("GET", "/api/v1/interval-versions?state=signed", "scientist");
    expect(bad.status).toBe(422);
    expect((await bad.json()).detail).toBe("state: state is one of draft, awaiting_signoff, in_force, superseded, withdrawn.");
  });

  it("revises a draft: partitions replaced, critical limits and note changed, audited", async () => {
    const before = await counts();
    const res = await send("PATCH", `/api/v1/interval-versions/${version.id}`, "director", {
      partitions: [
        { estimate: est.women.id, method: "parametric" },
        { estimate: est.men.id, method: "nonparametric" },
      ],
      criticalHigh: 20,
      note: "Split by sex after the Harris-Boyd test.",
    });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ id: version.id, number: version.number, state: "draft", criticalLow: 2.5, criticalHigh: 20, note: "Split by sex after the Harris-Boyd test." });
    expect(body.partitions.map((p: Doc) => [p.position, p.sex, p.method, p.model.kind])).toEqual([
      [1, "F", "parametric", "gaussian"],
      [2, "M", "nonparametric", "empirical"],
    ]);
    expect(body.partitions[1].model).toEqual({ kind: "empirical", n: 100 });
    expect(await counts()).toEqual({ ...before, interval_partitions: before.interval_partitions + 1, audit_events: before.audit_events + 1 });
    const [event] = (
      await pool.query("SELECT actor_label, action, details FROM audit_events WHERE entity_id = $1 AND action = 'interval_version.updated'", [version.id])
    ).rows;
    expect(event.actor_label).toBe(demoUser("director").email);
    expect(event.details.changes.criticalHigh).toEqual({ from: 25, to: 20 });
    expect(Object.keys(event.details.changes).sort()).toEqual(["criticalHigh", "note", "partitions"]);
  });

  it("refuses a revision that leaves nothing to change, or an overlap, with 422 and changes nothing", async () => {
    const before = await counts();
    const empty = await send("PATCH", `/api/v1/interval-versions/${version.id}`, "scientist", {});
    expect(empty.status).toBe(422);
    expect((await empty.json()).detail).toBe("(root): Give at least one of partitions, criticalLow, criticalHigh, note.");
    const overlap = await send("PATCH", `/api/v1/interval-versions/${version.id}`, "scientist", {
      partitions: [{ estimate: est.all.id, method: "parametric" }, { estimate: est.young.id, method: "parametric" }],
    });
    expect(overlap.status).toBe(422);
    expect((await overlap.json()).detail).toBe(
      "partitions.0 (All donors) and partitions.1 (age 18 to under 50) overlap: each patient must fall in one partition only.",
    );
    expect(await counts()).toEqual(before);
  });

  it("answers 409 to a revision of a version that is not a draft, and changes nothing", async () => {
    const submitted = await (await draft({ analyte: "GLU", study: studyId, partitions: [{ estimate: est.all.id, method: "parametric" }] })).json();
    await pool.query("UPDATE interval_versions SET state = 'awaiting_signoff' WHERE id = $1", [submitted.id]);
    const before = await counts();
    const res = await send("PATCH", `/api/v1/interval-versions/${submitted.id}`, "scientist", { note: "late change" });
    expect(res.status).toBe(409);
    expect((await res.json()).detail).toBe(`Version ${submitted.number} of GLU is awaiting sign-off: only a draft can be changed.`);
    expect(await counts()).toEqual(before);
    expect((await pool.query("SELECT note FROM interval_versions WHERE id = $1", [submitted.id])).rows[0].note).toBeNull();
  });

  it("answers 404 for an unknown version", async () => {
    const missing = "00000000-0000-4000-8000-000000000000";
    for (const method of ["GET", "PATCH"]) {
      const res = await send(method, `/api/v1/interval-versions/${missing}`, "scientist", method === "PATCH" ? { note: "x" } : undefined);
      expect(res.status).toBe(404);
      expect((await res.json()).detail).toBe(`There is no interval version with the id ${missing}.`);
    }
  });

  for (const role of ["admin", "clinician"] as const) {
    it(`refuses the ${role} every version route with 403 and changes nothing`, async () => {
      const before = await counts();
      const answers = [
        await draft({ analyte: "GLU", study: studyId, partitions: [{ estimate: est.women.id, method: "parametric" }] }, role),
        await send("GET", "/api/v1/interval-versions", role),
        await send("GET", `/api/v1/interval-versions/${version.id}`, role),
        await send("PATCH", `/api/v1/interval-versions/${version.id}`, role, { note: "x" }),
      ];
      expect(answers.map((r) => r.status)).toEqual([403, 403, 403, 403]);
      expect((await answers[0].json()).detail).toBe(`Your role (${role}) may not do this.`);
      expect(await counts()).toEqual(before);
    });
  }

  it("answers an anonymous caller 401 and changes nothing", async () => {
    const before = await counts();
    const answers = [
      await send("POST", "/api/v1/interval-versions", null, { analyte: "GLU", study: studyId, partitions: [] }),
      await send("GET", "/api/v1/interval-versions", null),
      await send("GET", `/api/v1/interval-versions/${version.id}`, null),
      await send("PATCH", `/api/v1/interval-versions/${version.id}`, null, { note: "x" }),
    ];
    expect(answers.map((r) => r.status)).toEqual([401, 401, 401, 401]);
    expect(await counts()).toEqual(before);
  });
});

describe("the unit and decimals lock (PATCH /api/v1/analytes/{code})", () => {
  it("allows a change while the analyte's versions are drafts, and answers 409 once one has left draft", async () => {
    const code = `LK${Date.now() % 100000}`;
    const created = await send("POST", "/api/v1/analytes", "scientist", { code, name: "Lock test analyte", unit: "mmol/L", decimals: 1, specimen: "serum" });
    expect(created.status).toBe(201);
    const study = await openStudy(send, "Lock test study", "scientist", code);
    await uploadAndCommit(cookies, study, donorCsv(generatedRows(60, 8, "L")));
    const estimateDoc = await (await send("POST", `/api/v1/studies/${study}/estimates`, "scientist", { outliers: "none" })).json();
    const version = await (await draft({ analyte: code, study, partitions: [{ estimate: estimateDoc.id, method: "parametric" }] })).json();
    expect(version.state).toBe("draft");

    const whileDraft = await send("PATCH", `/api/v1/analytes/${code}`, "scientist", { decimals: 2 });
    expect(whileDraft.status).toBe(200);

    await pool.query("UPDATE interval_versions SET state = 'awaiting_signoff' WHERE id = $1", [version.id]);
    const before = await counts();
    const unit = await send("PATCH", `/api/v1/analytes/${code}`, "scientist", { unit: "mg/dL" });
    expect(unit.status).toBe(409);
    expect((await unit.json()).detail).toBe(
      `The unit of ${code} cannot change: an interval version of ${code} has left draft and states its limits in mmol/L with 2 decimals. Create a new analyte code for the new unit instead.`,
    );
    const decimals = await send("PATCH", `/api/v1/analytes/${code}`, "director", { decimals: 3 });
    expect(decimals.status).toBe(409);
    expect((await decimals.json()).detail).toBe(
      `The display decimals of ${code} cannot change: an interval version of ${code} has left draft and states its limits in mmol/L with 2 decimals. Create a new analyte code for the new unit instead.`,
    );
    const name = await send("PATCH", `/api/v1/analytes/${code}`, "scientist", { name: "Lock test analyte, renamed" });
    expect(name.status).toBe(200);
    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    expect((await pool.query("SELECT unit, decimals FROM analytes WHERE code = $1", [code])).rows[0]).toEqual({ unit: "mmol/L", decimals: 2 });
  });
});
