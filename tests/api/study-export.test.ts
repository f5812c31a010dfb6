import ExcelJS from "exceljs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { donorCsv, excludeDirectly, generatedRows, openStudy, sender, sha256, signInAll, tableCounts, uploadAndCommit, type Cookies, type DonorRow } from "../support/studies";

const { pool } = testDatabase();
afterAll(() => pool.end());

const TABLES = ["studies", "uploads", "donor_results", "exclusions", "estimates", "partition_assessments", "audit_events"];
const counts = () => tableCounts(pool, TABLES);
let cookies: Cookies;
let send: ReturnType<typeof sender>;

/** Text that a spreadsheet program would take for a formula if it were written as one. */
const HOSTILE_CODES = ["=cmd|' /C calc'!A0", "+SUM(1,1)", "-1+2", "@SUM(A1:A2)"];
const HOSTILE_REASON = "\t=HYPERLINK(\"http://example.invalid\",\"click\")";
const HOSTILE_SUMMARY = "\r=1+1 combine";
/**
 * How that text reads back: XML 1.0 turns a bare carriage return into a line feed when the file
 * is read (§2.11, end-of-line handling) and exceljs writes it unescaped; it stays text.
 */
const HOSTILE_SUMMARY_READ = "\n=1+1 combine";

const ROWS: DonorRow[] = [
  ...generatedRows(40, 17, "E"),
  ...HOSTILE_CODES.map((code, i) => ({ code, sex: "F" as const, age: 30 + i, value: "5.00" })),
];
const CSV = donorCsv(ROWS);
let studyId: string;
let estimateIds: string[];

beforeAll(async () => {
  cookies = await signInAll();
  send = sender(cookies);
  studyId = await openStudy(send, "Glucose export");
  await uploadAndCommit(cookies, studyId, CSV, "export donors.csv");
  await excludeDirectly(pool, { studyId, donorCode: HOSTILE_CODES[0], reason: HOSTILE_REASON });
  await pool.query(
    `INSERT INTO partition_assessments (study_id, request, result) VALUES ($1, $2, $3)`,
    [
      studyId,
      { by: "sex" },
      {
        by: "sex", bands: null, sex: null, verdict: "combine", summary: HOSTILE_SUMMARY,
        groups: [{ label: "F", n: 22, mean: 5.1, sd: 0.6, median: 5 }, { label: "M", n: 21, mean: 5.0, sd: 0.6, median: 5 }],
        comparisons: [{ between: ["F", "M"], harrisBoyd: { verdict: "combine" }, lahti: { verdict: "combine" } }],
      },
    ],
  );
  estimateIds = [];
  for (const body of [{ outliers: "none" }, { partition: { sex: "F" }, seed: 3 }]) {
    const res = await send("POST", `/api/v1/studies/${studyId}/estimates`, "scientist", body);
    expect(res.status).toBe(201);
    estimateIds.push((await res.json()).id);
  }
});

async function workbookOf(res: Response): Promise<ExcelJS.Workbook> {
  const workbook = new ExcelJS.Workbook();
  await workbook.xlsx.load(await res.arrayBuffer());
  return workbook;
}

function rowsOf(sheet: ExcelJS.Worksheet): unknown[][] {
  const rows: unknown[][] = [];
  sheet.eachRow({ includeEmpty: false }, (row) => rows.push((row.values as unknown[]).slice(1)));
  return rows;
}

describe("GET /api/v1/studies/{id}/export", () => {
  it("answers an XLSX workbook with the four sheets, writing no cell as a formula, and audits the export", async () => {
    const before = await counts();
    const res = await send("GET", `/api/v1/studies/${studyId}/export`, "director");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/vnd.openxmlformats-officedocument.spreadsheetml.sheet");
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="bellwether-glu-glucose-export-\d{4}-\d{2}-\d{2}\.xlsx"$/);
    const workbook = await workbookOf(res);
    expect(workbook.worksheets.map((s) => s.name)).toEqual(["Summary", "Donor results", "Partitions", "Estimates"]);

    const texts: string[] = [];
    for (const sheet of workbook.worksheets) {
      sheet.eachRow((row) =>
        row.eachCell((cell) => {
          expect(cell.type, `${sheet.name}!${cell.address}`).not.toBe(ExcelJS.ValueType.Formula);
          expect(cell.formula, `${sheet.name}!${cell.address}`).toBeUndefined();
          if (typeof cell.value === "string") {
            texts.push(cell.value);
            expect(cell.numFmt, `${sheet.name}!${cell.address}`).toBe("@");
          }
        }),
      );
    }
    for (const text of [...HOSTILE_CODES, HOSTILE_REASON, HOSTILE_SUMMARY_READ]) expect(texts).toContain(text);

    expect(await counts()).toEqual({ ...before, audit_events: before.audit_events + 1 });
    const [event] = (
      await pool.query("SELECT actor_label, details FROM audit_events WHERE entity_id = $1 AND action = 'study.exported'", [studyId])
    ).rows;
    expect(event).toEqual({ actor_label: demoUser("director").email, details: { donorResults: ROWS.length, estimates: 2, assessments: 1 } });
  });

  it("summarises the study, its analyte, the uploads with SHA-256, the counts and the partition plan", async () => {
    const summary = rowsOf((await workbookOf(await send("GET", `/api/v1/studies/${studyId}/export`, "scientist"))).getWorksheet("Summary")!);
    const field = (name: string) => summary.find((r) => r[0] === name)?.[1];
    expect(field("Study")).toBe("Glucose export");
    expect(field("Analyte")).toBe("GLU (Glucose)");
    expect(field("Donor results")).toBe(ROWS.length);
    expect(field("Excluded (exclusion in effect)")).toBe(1);
    expect(field("Used for estimation")).toBe(ROWS.length - 1);
    expect(field("Partition plan")).toBe("Not chosen: one partition of everyone");
    const upload = summary.find((r) => r[0] === "export donors.csv");
    expect(upload?.slice(0, 6)).toEqual(["export donors.csv", sha256(CSV), "committed", ROWS.length, ROWS.length, 0]);
  });

  it("lists every donor result with its exclusion and reason, partitions assessed, and each estimate once per method", async () => {
    const workbook = await workbookOf(await send("GET", `/api/v1/studies/${studyId}/export`, "scientist"));
    const donors = rowsOf(workbook.getWorksheet("Donor results")!);
    expect(donors).toHaveLength(ROWS.length + 1);
    const head = donors[0] as string[];
    const col = (name: string) => head.indexOf(name);
    expect(donors.slice(1).map((r) => r[col("Donor code")])).toEqual(ROWS.map((r) => r.code));
    const hostile = donors.find((r) => r[col("Donor code")] === HOSTILE_CODES[0])!;
    expect([hostile[col("Excluded")], hostile[col("Exclusion source")], hostile[col("Reason")]]).toEqual(["yes", "manual", HOSTILE_REASON]);
    expect(donors.filter((r) => r[col("Excluded")] === "no")).toHaveLength(ROWS.length - 1);

    const partitions = rowsOf(workbook.getWorksheet("Partitions")!);
    expect(partitions.slice(1).map((r) => r[6] ?? null)).toEqual(["F", "M", "F vs M", null]);
    expect(partitions[partitions.length - 1][13]).toBe(HOSTILE_SUMMARY_READ);

    const estimates = rowsOf(workbook.getWorksheet("Estimates")!);
    const eHead = estimates[0] as string[];
    expect(estimates.slice(1).map((r) => [r[0], r[eHead.indexOf("Method")]])).toEqual(
      estimateIds.flatMap((id) => ["nonparametric", "parametric", "robust"].map((m) => [id, m])),
    );
    const stored = (await pool.query("SELECT document FROM estimates WHERE id = $1", [estimateIds[0]])).rows[0].document;
    const np = estimates[1];
    expect([np[eHead.indexOf("n")], np[eHead.indexOf("Lower limit")], np[eHead.indexOf("Upper limit")], np[eHead.indexOf("Seed")]]).toEqual([
      ROWS.length - 1,
      stored.nonparametric.lower,
      stored.nonparametric.upper,
      1,
    ]);
  });

  it("answers 404 for an unknown study and changes nothing", async () => {
    const missing = "00000000-0000-4000-8000-000000000000";
    const before = await counts();
    const res = await send("GET", `/api/v1/studies/${missing}/export`, "scientist");
    expect(res.status).toBe(404);
    expect((await res.json()).detail).toBe(`There is no study with the id ${missing}.`);
    expect(await counts()).toEqual(before);
  });

  for (const role of ["admin", "clinician", null] as const) {
    it(`refuses ${role ?? "an anonymous caller"} with ${role ? 403 : 401} and changes nothing`, async () => {
      const before = await counts();
      const res = await send("GET", `/api/v1/studies/${studyId}/export`, role);
      expect(res.status).toBe(role ? 403 : 401);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      expect(await counts()).toEqual(before);
    });
  }
});
