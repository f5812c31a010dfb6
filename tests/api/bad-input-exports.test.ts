/**
 * Spreadsheet formula text from users (donor codes, a file name, an exclusion reason, study and
 * analyte texts, a version's note) through the real routes into both workbooks Bellwether
 * writes, the study export and the version dossier, and the blank template. Each workbook is read
 * as raw SpreadsheetML (tests/support/xlsx-xml.ts, not exceljs): no cell is a formula, and every
 * text cell starting with =, +, -, @, a tab or a carriage return is a string cell with the Text
 * number format (numFmtId 49, "@"), so a spreadsheet program neither evaluates it on opening nor
 * after someone edits the cell. Which characters start a formula: OWASP, "CSV Injection"
 * (common practice).
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { signInOverHttp } from "../support/http-session";
import { corpusFile, countEveryTable, grown, ownerPool, sendRaw, sendUpload } from "../support/bad-input";
import { BASE_URL } from "../support/http-session";
import { ORIGIN } from "../support/bad-input";
import { FORMULA_START, xlsxCells, type XmlCell } from "../support/xlsx-xml";
import { generatedRows } from "../support/studies";

const { pool } = testDatabase();
const owner = ownerPool();
afterAll(async () => {
  await pool.end();
  await owner.end();
});

const CODE = `XF${Date.now().toString(36).toUpperCase()}`.slice(0, 16);
const ANALYTE_NAME = "=SUM(1,1) test analyte";
const TITLE = '=HYPERLINK("http://example.invalid","open")';
const CRITERIA = "+1 healthy adults";
const METHOD = "-2+3 hexokinase";
const SPECIMEN = "@plasma";
const FILE_NAME = "=cmd|' /C calc'!A0.csv";
const REASON_TAB = "\t=1+1 haemolysed";
const REASON_CR = "\r=1+1 lipaemic";
const NOTE = "@SUM(A1:A2) reviewed";
/** The donor codes of tests/fixtures/bad-input/formula-text.csv as stored (trimmed). */
const CODES = ["=cmd|' /C calc'!A0", "+SUM(1;2)", "-2+3", "@SUM(A1:A2)", '=HYPERLINK("http://example.invalid","x")'];

let scientist: string;
let director: string;
let studyId: string;
let versionId: string;

async function json(method: string, path: string, cookie: string, body?: unknown) {
  const sent = await sendRaw(method, path, { cookie }, body === undefined ? undefined : { bytes: JSON.stringify(body), type: "application/json" });
  expect(sent.status, JSON.stringify(sent.json)).toBeLessThan(300);
  return sent.json as Record<string, unknown>;
}

beforeAll(async () => {
  scientist = await signInOverHttp(demoUser("scientist").email, demoUser("scientist").password);
  director = await signInOverHttp(demoUser("director").email, demoUser("director").password);
  await json("POST", "/api/v1/analytes", scientist, { code: CODE, name: ANALYTE_NAME, unit: "mmol/L", decimals: 2 });
  studyId = (await json("POST", "/api/v1/studies", scientist, { analyte: CODE, title: TITLE, criteria: CRITERIA, method: METHOD, specimen: SPECIMEN })).id as string;
  // The corpus's formula-text donors and 60 seeded ones, so that the estimate has enough values.
  const extra = generatedRows(60, 23, "G").map((r) => `${r.code},${r.sex},${r.age},${r.value}`);
  const csv = Buffer.concat([corpusFile("formula-text.csv"), Buffer.from(extra.join("\n") + "\n")]);
  const upload = await sendUpload(`/api/v1/studies/${studyId}/uploads`, scientist, csv, FILE_NAME);
  expect(upload.status, JSON.stringify(upload.json)).toBe(201);
  await json("POST", `/api/v1/studies/${studyId}/uploads/${upload.json!.id}/commit`, scientist);
  // Reasons the API would trim, straight into the table as the app's role: the writer must cope.
  for (const [code, reason] of [[CODES[1], REASON_TAB], [CODES[2], REASON_CR]]) {
    await pool.query(
      `INSERT INTO exclusions (study_id, donor_result_id, source, reason)
       SELECT $1, id, 'manual', $3 FROM donor_results WHERE study_id = $1 AND donor_code = $2`,
      [studyId, code, reason],
    );
  }
  const estimate = await json("POST", `/api/v1/studies/${studyId}/estimates`, scientist, { outliers: "none", seed: 5 });
  versionId = (await json("POST", "/api/v1/interval-versions", scientist, { analyte: CODE, study: studyId, partitions: [{ estimate: estimate.id, method: "parametric" }], note: NOTE }))
    .id as string;
});

async function download(path: string, cookie: string): Promise<Uint8Array> {
  const res = await fetch(`${BASE_URL}${path}`, { headers: { cookie, origin: ORIGIN } });
  expect(res.status).toBe(200);
  expect(res.headers.get("content-type")).toBe("application/vnd.openxmlformats-officedocument.spreadsheetml.sheet");
  return new Uint8Array(await res.arrayBuffer());
}

/** No formula anywhere; text that would start one is a Text-formatted string cell; numbers are numbers. */
function expectNoFormula(cells: XmlCell[]): void {
  expect(cells.filter((c) => c.formula).map((c) => `${c.sheet}!${c.ref}`)).toEqual([]);
  const wrong = cells
    .filter((c) => (c.type === "n" ? !Number.isFinite(Number(c.text)) : FORMULA_START.test(c.text) && !((c.type === "inlineStr" || c.type === "s") && c.numFmtId === 49)))
    .map((c) => `${c.sheet}!${c.ref} (${c.type}, numFmt ${c.numFmtId}): ${JSON.stringify(c.text)}`);
  expect(wrong).toEqual([]);
}

/** XML reads a bare carriage return as a line feed (XML 1.0 §2.11); compare texts as a reader sees them. */
const asRead = (s: string) => s.replace(/\r\n?/g, "\n");

function expectTexts(cells: XmlCell[], texts: string[]): void {
  const present = new Set(cells.filter((c) => c.type !== "n").map((c) => asRead(c.text)));
  expect(texts.filter((t) => !present.has(asRead(t)))).toEqual([]);
}

describe("workbooks never write user text as a formula", () => {
  it("the study workbook: donor codes, file name, reasons and study texts are Text cells", async () => {
    const before = await countEveryTable(owner);
    const cells = xlsxCells(await download(`/api/v1/studies/${studyId}/export`, scientist));
    expectNoFormula(cells);
    expectTexts(cells, [...CODES, FILE_NAME, REASON_TAB, REASON_CR, TITLE, CRITERIA, METHOD, SPECIMEN]);
    // The export is audited (study.exported) and changes nothing else.
    expect(await countEveryTable(owner)).toEqual(grown(before, { audit_events: 1 }));
  });

  it("the dossier of a version: the same, and the analyte's name and the version's note", async () => {
    const before = await countEveryTable(owner);
    const cells = xlsxCells(await download(`/api/v1/interval-versions/${versionId}/dossier`, director));
    expectNoFormula(cells);
    expectTexts(cells, [...CODES, FILE_NAME, REASON_TAB, REASON_CR, TITLE, NOTE]);
    expect(await countEveryTable(owner)).toEqual(grown(before, { audit_events: 1 }));
  });

  it("the blank template of the analyte", async () => {
    const before = await countEveryTable(owner);
    const cells = xlsxCells(await download(`/api/v1/uploads/template?format=xlsx&analyte=${CODE}`, scientist));
    expectNoFormula(cells);
    expect(await countEveryTable(owner)).toEqual(before);
  });
});
