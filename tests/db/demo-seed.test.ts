import { createHash } from "node:crypto";
import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrateDatabase } from "@/db/migrate";
import * as schema from "@/db/schema";
import { seedDemo } from "@/db/seed";
import { paediatricAlp } from "@/db/demo-donors";
import { createScorer, scoringPartitionSchema } from "@/lib/scoring";
import { lmsCentileAt, type LmsModel } from "@/lib/stats/lms-model";
import { createScratchDatabase, SUPERUSER_URL, type ScratchDatabase } from "../support/scratch-database";

/** Every table the seed may write, to show that a second run adds nothing. */
const TABLES = [
  "laboratory", "users", "analytes", "studies", "uploads", "donor_results", "exclusions", "outlier_decisions",
  "partition_assessments", "estimates", "interval_versions", "interval_partitions", "audit_events", "signatures", "outbox",
];

/** The demo's studies and the donor results each holds (db/demo-studies.ts, written out). */
const DONORS_PER_STUDY: Record<string, number> = {
  "Sodium: Harrowmere reference interval study 2024": 240,
  "Potassium: Harrowmere reference interval study 2024": 240,
  "Calcium: Harrowmere reference interval study 2024": 240,
  "Glucose: Harrowmere reference interval study 2024": 240,
  "Urea: Harrowmere reference interval study 2024": 220,
  "ALT: Harrowmere reference interval study 2024": 240,
  "TSH: Harrowmere reference interval study 2024": 240,
  "Creatinine: Harrowmere reference interval study 2024": 300,
  "Haemoglobin: Harrowmere reference interval study 2024": 300,
  "Alkaline phosphatase: children and adults 2025-26": 310,
  "Alkaline phosphatase: paediatric age curves 2025": 1200,
  "Sodium: verification after the AX-400 electrode change": 200,
  "ALT: 2026 re-establishment with pyridoxal phosphate": 240,
  "Haemoglobin: Hemavue 7 introduction": 300,
  "Potassium: 2026 study with the new tube supplier": 240,
  "Urea: second analyser (AX-400 #2) comparison": 200,
  // Routine results, not donors: db/demo-routine.ts's 9,000 invented patients (seed 2617) with one
  // to three results each.
  "TSH: indirect interval from routine results 2025-26": 11771,
};

// Needs the cluster's superuser for a scratch database: skipped against an external test database.
describe.skipIf(!SUPERUSER_URL)("the demo seed (db/seed.ts) in a fresh database", () => {
  let db: ScratchDatabase;
  let pool: Pool;
  let firstRun: boolean;
  const rows = async <T>(text: string, values: unknown[] = []) => (await pool.query(text, values)).rows as T[];
  const counts = async () => {
    const out: Record<string, number> = {};
    for (const t of TABLES) out[t] = (await rows<{ n: number }>(`SELECT count(*)::int AS n FROM ${t}`))[0].n;
    return out;
  };

  beforeAll(async () => {
    db = await createScratchDatabase("demo_seed");
    await migrateDatabase(db.ownerUrl);
    // As the app's role, as the start command seeds.
    pool = new Pool({ connectionString: db.appUrl, max: 2 });
    firstRun = await seedDemo(drizzle(pool, { schema }));
  }, 120_000);

  afterAll(async () => {
    await pool?.end();
    await db?.drop();
  });

  it("seeds the accounts, the eleven analytes and seventeen studies, each study's file committed", async () => {
    expect(firstRun).toBe(true);
    expect((await counts()).users).toBe(4);
    expect((await rows<{ code: string }>("SELECT code FROM analytes ORDER BY code")).map((a) => a.code)).toEqual([
      "ALP", "ALPC", "ALT", "CA", "CREA", "GLU", "HGB", "K", "NA", "TSH", "UREA",
    ]);
    const studies = await rows<{ title: string; uploads: number; committed: number; stored: number; donors: number }>(`
      SELECT s.title,
        (SELECT count(*)::int FROM uploads u WHERE u.study_id = s.id) AS uploads,
        (SELECT count(*)::int FROM uploads u WHERE u.study_id = s.id AND u.status = 'committed') AS committed,
        (SELECT sum(u.stored_rows)::int FROM uploads u WHERE u.study_id = s.id) AS stored,
        (SELECT count(*)::int FROM donor_results d WHERE d.study_id = s.id) AS donors
      FROM studies s`);
    expect(Object.fromEntries(studies.map((s) => [s.title, s.donors]))).toEqual(DONORS_PER_STUDY);
    for (const s of studies) expect(s, s.title).toMatchObject({ uploads: 1, committed: 1, stored: s.donors });
    // Committed as the demo scientist, through the upload queries: each commit is on the audit trail.
    const [{ n }] = await rows<{ n: number }>(
      "SELECT count(*)::int AS n FROM audit_events WHERE action = 'upload.committed' AND actor_label = 'scientist@harrowmere.example'",
    );
    expect(n).toBe(17);
    const [{ pending }] = await rows<{ pending: number }>("SELECT count(*)::int AS pending FROM uploads WHERE pending_rows IS NOT NULL");
    expect(pending).toBe(0);
  });

  it("gives the cohorts their shapes: haemoglobin by sex, alkaline phosphatase by age, gross potassium errors", async () => {
    // The cohorts' design (db/demo-donors.ts): men's haemoglobin 149 g/L against women's 134; ALP's
    // median 215 U/L in children against 72 in adults; four gross potassium errors from 6.9 to 9.6.
    const hgb = await rows<{ sex: string; mean: number }>(`
      SELECT d.sex, avg(d.value) AS mean FROM donor_results d JOIN studies s ON s.id = d.study_id
      WHERE s.title = 'Haemoglobin: Harrowmere reference interval study 2024' GROUP BY d.sex ORDER BY d.sex`);
    expect(hgb.map((h) => h.sex)).toEqual(["F", "M"]);
    expect(hgb[1].mean - hgb[0].mean).toBeGreaterThan(10);
    const alp = await rows<{ child: boolean; median: number }>(`
      SELECT d.age_years < 18 AS child, percentile_cont(0.5) WITHIN GROUP (ORDER BY d.value) AS median
      FROM donor_results d JOIN studies s ON s.id = d.study_id
      WHERE s.title = 'Alkaline phosphatase: children and adults 2025-26' GROUP BY 1 ORDER BY 1`);
    expect(alp[1].median / alp[0].median).toBeGreaterThan(2);
    const gross = await rows<{ donor_code: string; value: number }>(`
      SELECT d.donor_code, d.value FROM donor_results d JOIN studies s ON s.id = d.study_id
      WHERE s.title = 'Potassium: 2026 study with the new tube supplier' AND d.value > 6 ORDER BY d.value`);
    expect(gross).toEqual([
      { donor_code: "HRW-K26-0017", value: 6.9 },
      { donor_code: "HRW-K26-0088", value: 7.4 },
      { donor_code: "HRW-K26-0152", value: 8.1 },
      { donor_code: "HRW-K26-0203", value: 9.6 },
    ]);
  });

  it("has one study at each stage, each stage holding the ones before it", async () => {
    const studies = await rows<{
      title: string;
      screened: number;
      assessments: number;
      plan: unknown;
      estimates: number;
      version: string | null;
    }>(`
      SELECT s.title,
        (SELECT count(*)::int FROM audit_events a WHERE a.action = 'study.screened' AND a.entity_id = s.id::text) AS screened,
        (SELECT count(*)::int FROM partition_assessments p WHERE p.study_id = s.id) AS assessments,
        s.partition_plan AS plan,
        (SELECT count(*)::int FROM estimates e WHERE e.study_id = s.id) AS estimates,
        (SELECT v.state::text FROM interval_versions v WHERE v.study_id = s.id) AS version
      FROM studies s`);
    const byTitle = Object.fromEntries(studies.map(({ title, ...rest }) => [title, rest]));
    const bySex = { sex: true, ageBands: null };
    // db/demo-studies.ts written out: Horn's screen once per study from "screened" on; partitions
    // assessed where the analyte differs by sex or age; one estimate per partition; the version's state.
    expect(byTitle).toEqual({
      "Sodium: Harrowmere reference interval study 2024": { screened: 1, assessments: 0, plan: null, estimates: 1, version: "in_force" },
      "Potassium: Harrowmere reference interval study 2024": { screened: 1, assessments: 0, plan: null, estimates: 1, version: "in_force" },
      "Calcium: Harrowmere reference interval study 2024": { screened: 1, assessments: 0, plan: null, estimates: 1, version: "in_force" },
      "Glucose: Harrowmere reference interval study 2024": { screened: 1, assessments: 0, plan: null, estimates: 1, version: "in_force" },
      "Urea: Harrowmere reference interval study 2024": { screened: 1, assessments: 0, plan: null, estimates: 1, version: "in_force" },
      "ALT: Harrowmere reference interval study 2024": { screened: 1, assessments: 0, plan: null, estimates: 1, version: "in_force" },
      "TSH: Harrowmere reference interval study 2024": { screened: 1, assessments: 0, plan: null, estimates: 1, version: "in_force" },
      "Creatinine: Harrowmere reference interval study 2024": { screened: 1, assessments: 1, plan: bySex, estimates: 2, version: "in_force" },
      "Haemoglobin: Harrowmere reference interval study 2024": { screened: 1, assessments: 1, plan: bySex, estimates: 2, version: "in_force" },
      "Alkaline phosphatase: children and adults 2025-26": {
        screened: 1, assessments: 1, plan: { sex: false, ageBands: [[0, 18], [18, 120]] }, estimates: 2, version: "awaiting_signoff",
      },
      // The age-curve study: no screen or partitions (the curves take age in themselves), one LMS fit.
      "Alkaline phosphatase: paediatric age curves 2025": { screened: 0, assessments: 0, plan: null, estimates: 1, version: "in_force" },
      "Sodium: verification after the AX-400 electrode change": { screened: 1, assessments: 0, plan: null, estimates: 1, version: "draft" },
      "ALT: 2026 re-establishment with pyridoxal phosphate": { screened: 1, assessments: 0, plan: null, estimates: 1, version: null },
      "Haemoglobin: Hemavue 7 introduction": { screened: 1, assessments: 1, plan: bySex, estimates: 0, version: null },
      "Potassium: 2026 study with the new tube supplier": { screened: 1, assessments: 0, plan: null, estimates: 0, version: null },
      "Urea: second analyser (AX-400 #2) comparison": { screened: 0, assessments: 0, plan: null, estimates: 0, version: null },
      // The indirect study: cleaning and its partition are part of its one estimate; a draft from it.
      "TSH: indirect interval from routine results 2025-26": { screened: 0, assessments: 0, plan: null, estimates: 1, version: "draft" },
    });
  });

  it("keeps the screened study's exclusions with their reasons: four confirmed outliers and a manual exclusion of two", async () => {
    const excluded = await rows<{ donor_code: string; source: string; rule: string | null; reason: string; decision: string | null }>(`
      SELECT d.donor_code, e.source, e.rule, e.reason, o.decision
      FROM exclusions e JOIN donor_results d ON d.id = e.donor_result_id JOIN studies s ON s.id = e.study_id
      LEFT JOIN outlier_decisions o ON o.exclusion_id = e.id
      WHERE e.undone_at IS NULL ORDER BY d.donor_code`);
    const outlier = "Haemolysed or EDTA-contaminated on the sample log: not a healthy-donor value.";
    const manual = "Donors disclosed a potassium supplement after sampling (recruitment criterion).";
    expect(excluded).toEqual([
      { donor_code: "HRW-K26-0017", source: "outlier", rule: "horn", reason: outlier, decision: "exclude" },
      { donor_code: "HRW-K26-0041", source: "manual", rule: null, reason: manual, decision: null },
      { donor_code: "HRW-K26-0042", source: "manual", rule: null, reason: manual, decision: null },
      { donor_code: "HRW-K26-0088", source: "outlier", rule: "horn", reason: outlier, decision: "exclude" },
      { donor_code: "HRW-K26-0152", source: "outlier", rule: "horn", reason: outlier, decision: "exclude" },
      { donor_code: "HRW-K26-0203", source: "outlier", rule: "horn", reason: outlier, decision: "exclude" },
    ]);
    // Every other proposal of the screens was answered "keep", with a reason, by the demo scientist.
    const kept = await rows<{ reason: string; decided_by: string }>(
      "SELECT DISTINCT o.reason, u.email AS decided_by FROM outlier_decisions o JOIN users u ON u.id = o.decided_by WHERE o.decision = 'keep'",
    );
    expect(kept).toEqual([
      { reason: "Reviewed against the sample log: no pre-analytical error, within what healthy donors show. Kept.", decided_by: "scientist@harrowmere.example" },
    ]);
  });

  it("has two drafts, a version awaiting sign-off and ten in force, numbered per analyte", async () => {
    const versions = await rows<{ code: string; number: number; state: string; effective: string | null; partitions: number }>(`
      SELECT a.code, v.number, v.state::text AS state, to_char(v.effective_from AT TIME ZONE 'UTC', 'YYYY-MM-DD') AS effective,
        (SELECT count(*)::int FROM interval_partitions p WHERE p.version_id = v.id) AS partitions
      FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id ORDER BY a.code, v.number`);
    expect(versions).toEqual([
      { code: "ALP", number: 1, state: "awaiting_signoff", effective: null, partitions: 2 },
      { code: "ALPC", number: 1, state: "in_force", effective: "2026-02-02", partitions: 1 },
      { code: "ALT", number: 1, state: "in_force", effective: "2025-01-06", partitions: 1 },
      { code: "CA", number: 1, state: "in_force", effective: "2025-01-06", partitions: 1 },
      { code: "CREA", number: 1, state: "in_force", effective: "2025-01-06", partitions: 2 },
      { code: "GLU", number: 1, state: "in_force", effective: "2025-01-06", partitions: 1 },
      { code: "HGB", number: 1, state: "in_force", effective: "2025-01-06", partitions: 2 },
      { code: "K", number: 1, state: "in_force", effective: "2025-01-06", partitions: 1 },
      { code: "NA", number: 1, state: "in_force", effective: "2025-01-06", partitions: 1 },
      { code: "NA", number: 2, state: "draft", effective: null, partitions: 1 },
      { code: "TSH", number: 1, state: "in_force", effective: "2025-02-03", partitions: 1 },
      { code: "TSH", number: 2, state: "draft", effective: null, partitions: 1 },
      { code: "UREA", number: 1, state: "in_force", effective: "2025-01-06", partitions: 1 },
    ]);
  });

  it("gives every partition in force limits, 90% CIs and a scoring model that puts the limits at percentiles 2.5 and 97.5", async () => {
    const partitions = await rows<{
      code: string; unit: string; decimals: number; method: string; n: number; low: number; high: number;
      low_ci_lower: number; low_ci_upper: number; high_ci_lower: number; high_ci_upper: number; model: unknown; estimate_id: string | null;
    }>(`
      SELECT a.code, v.unit, v.decimals, p.method, p.n, p.low, p.high, p.low_ci_lower, p.low_ci_upper, p.high_ci_lower, p.high_ci_upper,
        p.model, p.estimate_id
      FROM interval_partitions p JOIN interval_versions v ON v.id = p.version_id JOIN analytes a ON a.id = v.analyte_id
      WHERE v.state = 'in_force' AND p.method <> 'lms'`);
    expect(partitions).toHaveLength(11);
    for (const p of partitions) {
      const label = `${p.code} ${p.method}`;
      expect(p.estimate_id, label).not.toBeNull();
      expect(p.low_ci_lower, label).toBeLessThanOrEqual(p.low);
      expect(p.low_ci_upper, label).toBeGreaterThanOrEqual(p.low);
      expect(p.high_ci_lower, label).toBeLessThanOrEqual(p.high);
      expect(p.high_ci_upper, label).toBeGreaterThanOrEqual(p.high);
      const partition = scoringPartitionSchema.parse({ low: p.low, high: p.high, unit: p.unit, decimals: p.decimals, model: p.model, n: p.n });
      const score = createScorer(partition);
      // The definition of a 95% reference interval (CLSI EP28-A3c): its limits are the 2.5th and
      // 97.5th percentiles; 1e-6 allows for floating point in the transforms.
      expect(score(p.low).percentile, label).toBeCloseTo(2.5, 6);
      expect(score(p.high).percentile, label).toBeCloseTo(97.5, 6);
    }
    // The methods chosen in db/demo-studies.ts: parametric for calcium, ALT and haemoglobin (a
    // gaussian model), nonparametric elsewhere (the empirical model of the reference values).
    const kinds = Object.fromEntries(
      [...new Set(partitions.map((p) => p.code))].sort().map((code) => [code, [...new Set(partitions.filter((p) => p.code === code).map((p) => (p.model as { kind: string }).kind))]]),
    );
    expect(kinds).toEqual({
      ALT: ["gaussian"], CA: ["gaussian"], CREA: ["empirical"], GLU: ["empirical"], HGB: ["gaussian"],
      K: ["empirical"], NA: ["empirical"], TSH: ["empirical"], UREA: ["empirical"],
    });
  });

  it("signs every version in force once, as the demo director, with a hash that recomputes from its canonical content", async () => {
    const signed = await rows<{ code: string; state: string; meaning: string; signer: string; signer_role: string; canonical_content: string; content_sha256: string; signed_at: Date; effective_from: Date; session_id: string }>(`
      SELECT a.code, v.state::text AS state, s.meaning::text AS meaning, u.email AS signer, s.signer_role::text AS signer_role,
        s.canonical_content, s.content_sha256, s.signed_at, v.effective_from, s.session_id
      FROM signatures s JOIN interval_versions v ON v.id = s.version_id JOIN analytes a ON a.id = v.analyte_id JOIN users u ON u.id = s.signer_id
      ORDER BY a.code`);
    const inForce = await rows<{ code: string }>("SELECT a.code FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE v.state = 'in_force' ORDER BY a.code");
    expect(signed.map((s) => s.code)).toEqual(inForce.map((v) => v.code));
    for (const s of signed) {
      expect({ state: s.state, meaning: s.meaning, signer: s.signer, role: s.signer_role, session: s.session_id }, s.code).toEqual({
        state: "in_force", meaning: "approved_for_clinical_use", signer: "director@harrowmere.example", role: "director", session: "demo-seed",
      });
      // The hash is SHA-256 of the stored text's UTF-8 bytes (node:crypto here; sha256sum gives the same, see tests/lib/versions).
      expect(createHash("sha256").update(s.canonical_content, "utf8").digest("hex"), s.code).toBe(s.content_sha256);
      expect(JSON.parse(s.canonical_content)).toMatchObject({ analyte: { code: s.code }, number: 1 });
      expect(s.signed_at.getTime(), s.code).toBe(s.effective_from.getTime());
    }
    // Submitted by the scientist, so the director's signature keeps the duties apart.
    const submitters = await rows<{ email: string; n: number }>(`
      SELECT u.email, count(*)::int AS n FROM interval_versions v JOIN users u ON u.id = v.submitted_by
      WHERE v.state IN ('in_force', 'awaiting_signoff') GROUP BY u.email`);
    expect(submitters).toEqual([{ email: "scientist@harrowmere.example", n: 11 }]);
  });

  it("puts the paediatric age curves in force by issue 11's partition contract, their limits at the 2.5th and 97.5th centiles", async () => {
    const [p] = await rows<{ method: string; low: number | null; high: number | null; sex: string | null; age_from_days: number; age_to_days: number; n: number; model: LmsModel; document: { model: LmsModel } }>(`
      SELECT p.method, p.low, p.high, p.sex, p.age_from_days, p.age_to_days, p.n, p.model, e.document
      FROM interval_partitions p JOIN interval_versions v ON v.id = p.version_id JOIN analytes a ON a.id = v.analyte_id
      JOIN estimates e ON e.id = p.estimate_id WHERE a.code = 'ALPC' AND v.state = 'in_force'`);
    expect(p).toMatchObject({ method: "lms", low: null, high: null, sex: null, n: 1200 });
    expect(p.model).toEqual(p.document.model);
    expect(p.age_from_days).toBe(Math.ceil(p.model.ageMin * 365.25));
    expect(p.age_to_days).toBe(Math.floor(p.model.ageMax * 365.25) + 1);
    // The donors were drawn from db/demo-donors.ts's paediatricAlp curves; at 5 and 12 years the
    // fitted limits lie within 15% of the true 95% width of those curves' 2.5th and 97.5th centiles
    // (z = ∓1.959964, @stdlib's Φ⁻¹(0.975)); 1,200 donors, as lib/stats' accuracy test measures.
    for (const age of [5, 12]) {
      const lower = paediatricAlp(age, -1.959964);
      const upper = paediatricAlp(age, 1.959964);
      const width = upper - lower;
      expect(Math.abs(lmsCentileAt(p.model, age, 2.5)! - lower) / width, `lower at ${age}`).toBeLessThan(0.15);
      expect(Math.abs(lmsCentileAt(p.model, age, 97.5)! - upper) / width, `upper at ${age}`).toBeLessThan(0.15);
    }
  });

  it("changes nothing when it runs again", async () => {
    const before = await counts();
    expect(await seedDemo(drizzle(pool, { schema }))).toBe(false);
    expect(await counts()).toEqual(before);
  });

  it("leaves a database whose users are not the demo's alone", async () => {
    const other = await createScratchDatabase("not_demo");
    const otherPool = new Pool({ connectionString: other.appUrl, max: 1 });
    try {
      await migrateDatabase(other.ownerUrl);
      await otherPool.query(
        "INSERT INTO users (email, name, role, password_hash) VALUES ('head@lab.example', 'Head of laboratory', 'director', 'x')",
      );
      expect(await seedDemo(drizzle(otherPool, { schema }))).toBe(false);
      const [{ studies, analytes }] = (
        await otherPool.query("SELECT (SELECT count(*)::int FROM studies) AS studies, (SELECT count(*)::int FROM analytes) AS analytes")
      ).rows;
      expect({ studies, analytes }).toEqual({ studies: 0, analytes: 0 });
    } finally {
      await otherPool.end();
      await other.drop();
    }
  });
});
