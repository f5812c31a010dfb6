/**
 * The bad-input corpus, uploads part: every file of tests/fixtures/bad-input/ (and the two large
 * ones made at test time) sent through the real upload route as the scientist. Each is either
 * refused whole with its exact status and message, changing no table but the audit trail's record
 * of the refusal, or accepted and read as written: the validation report says what each row
 * became, and a commit stores exactly that. The row count of every table of the schema
 * (tests/support/bad-input.ts) is compared before and after each request.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { signInOverHttp } from "../support/http-session";
import {
  corpusFile,
  countEveryTable,
  expectRefusal,
  grown,
  largeCsv,
  manyRowsCsv,
  wideCsv,
  ownerPool,
  sendRaw,
  sendUpload,
  type Sent,
} from "../support/bad-input";

const { pool } = testDatabase();
const owner = ownerPool();
afterAll(async () => {
  await pool.end();
  await owner.end();
});

let scientist: string;
beforeAll(async () => {
  scientist = await signInOverHttp(demoUser("scientist").email, demoUser("scientist").password);
});

async function openStudy(title: string): Promise<string> {
  const res = await sendRaw("POST", "/api/v1/studies", { cookie: scientist }, {
    bytes: JSON.stringify({ analyte: "GLU", title, method: "Hexokinase", specimen: "plasma" }),
    type: "application/json",
  });
  expect(res.status).toBe(201);
  return res.json!.id as string;
}

interface Refused {
  /** A file of the corpus, or bytes made at test time, or no file at all. */
  file: string | (() => Uint8Array) | null;
  name: string;
  fields?: Record<string, string>;
  status: number;
  detail: string;
  /** The lib/uploads refusal code the answer carries (`uploadError`), when the file was read. */
  uploadError?: string;
  /** Whether the refusal is on the audit trail (`upload.refused`): only files refused after reading. */
  audited: boolean;
}

const refused: Record<string, Refused> = {
  "binary garbage named .csv": {
    file: "garbage.csv",
    name: "garbage.csv",
    status: 415,
    detail: "the file is neither CSV text nor an Excel workbook (.xlsx)",
    uploadError: "unreadable",
    audited: true,
  },
  "a ZIP archive renamed .xlsx": {
    file: "zip-renamed.xlsx",
    name: "donors.xlsx",
    status: 415,
    detail: "the file is a ZIP archive but not a readable Excel workbook (.xlsx)",
    uploadError: "unreadable",
    audited: true,
  },
  "an old binary .xls workbook": {
    file: "legacy.xls",
    name: "donors.xls",
    status: 415,
    detail: "the file is an old-style Excel workbook (.xls) or another binary Office file; save it as .xlsx or CSV",
    uploadError: "unreadable",
    audited: true,
  },
  "Windows-1252 text (not UTF-8)": {
    file: "windows-1252.csv",
    name: "donors.csv",
    status: 415,
    detail: 'the file is not UTF-8 text; save it as "CSV UTF-8" (or UTF-16 with a byte-order mark) and upload it again',
    uploadError: "encoding",
    audited: true,
  },
  "UTF-16 without a byte-order mark": {
    file: "utf16-no-bom.csv",
    name: "donors.csv",
    status: 415,
    detail: 'the file looks like UTF-16 text without a byte-order mark; save it as "CSV UTF-8" (or UTF-16 with a byte-order mark) and upload it again',
    uploadError: "encoding",
    audited: true,
  },
  "an empty file": {
    file: "empty.csv",
    name: "donors.csv",
    status: 422,
    detail: "the file is empty",
    uploadError: "empty",
    audited: true,
  },
  "blank lines only": {
    file: "blank-lines.csv",
    name: "donors.csv",
    status: 422,
    detail: "the file is empty",
    uploadError: "empty",
    audited: true,
  },
  "a header row only": {
    file: "header-only.csv",
    name: "donors.csv",
    status: 422,
    detail: "the file has a header row but no data rows",
    uploadError: "no_data_rows",
    audited: true,
  },
  "one column": {
    file: "one-column.csv",
    name: "donors.csv",
    status: 422,
    detail: 'no column of the file is mapped to donor_code, sex; name the file\'s header for each in the mapping (its headers: "value")',
    uploadError: "mapping",
    audited: true,
  },
  "a quoted field that never closes": {
    file: "unclosed-quote.csv",
    name: "donors.csv",
    status: 422,
    detail: "the file is not readable as CSV: a quoted field opened in data row 2 is never closed",
    uploadError: "malformed",
    audited: true,
  },
  "the same header twice": {
    file: "duplicate-header.csv",
    name: "donors.csv",
    status: 422,
    detail: 'the header "value" appears in columns 4 and 5; rename one of them so that each column is read from one header',
    uploadError: "mapping",
    audited: true,
  },
  "a control character (U+0007) in a donor code": {
    file: "control-character.csv",
    name: "donors.csv",
    status: 422,
    detail: "line 3 of the file holds the control character U+0007, which CSV text does not contain; remove it and upload the file again",
    uploadError: "malformed",
    audited: true,
  },
  "a workbook whose first sheet holds notes, not donors": {
    file: "several-sheets.xlsx",
    name: "donors.xlsx",
    status: 422,
    detail:
      'no column of the file is mapped to donor_code, sex, value; name the file\'s header for each in the mapping (its headers: "Collected at the invented Harrowmere cli…" (43 characters)) (read from the sheet "Notes"; the workbook\'s sheets are "Notes", "Donors", "Empty": name the sheet to read in the sheet field)',
    uploadError: "mapping",
    audited: true,
  },
  "a workbook's empty sheet, chosen": {
    file: "several-sheets.xlsx",
    name: "donors.xlsx",
    fields: { sheet: "Empty" },
    status: 422,
    detail: 'the sheet "Empty" is empty',
    uploadError: "empty",
    audited: true,
  },
  "a sheet the workbook does not have": {
    file: "several-sheets.xlsx",
    name: "donors.xlsx",
    fields: { sheet: "Donors 2026" },
    status: 422,
    detail: 'the workbook has no sheet "Donors 2026"; its sheets are "Notes", "Donors", "Empty"',
    uploadError: "unknown_sheet",
    audited: true,
  },
  "a mapping that is not JSON": {
    file: "utf8-bom.csv",
    name: "donors.csv",
    fields: { mapping: "{value: Result}" },
    status: 422,
    detail: "mapping: The mapping is not valid JSON.",
    audited: false,
  },
  "a decimalComma that is not true or false": {
    file: "utf8-bom.csv",
    name: "donors.csv",
    fields: { decimalComma: "yes" },
    status: 422,
    detail: 'decimalComma: decimalComma is "true" or "false".',
    audited: false,
  },
  "no file field": {
    file: null,
    name: "donors.csv",
    fields: { sheet: "Donors" },
    status: 422,
    detail: "file: Attach the file (CSV or XLSX) in the field named file.",
    audited: false,
  },
  "a NUL character in the sheet field": {
    file: "several-sheets.xlsx",
    name: "donors.xlsx",
    fields: { sheet: "Don\u0000ors" },
    status: 422,
    detail: "sheet: the text holds the character U+0000 (NUL), which cannot be stored; remove it.",
    audited: false,
  },
  "a header row of 100,000 columns": {
    file: () => wideCsv(100_000),
    name: "donors.csv",
    status: 422,
    detail: "the header row has 100,000 columns; a file of donor results has at most 1,000",
    uploadError: "malformed",
    audited: true,
  },
  "thirty headers, none of them the template's": {
    file: () => Buffer.from(Array.from({ length: 30 }, (_, i) => `h${i + 1}`).join(",") + "\n" + "1,".repeat(29) + "1\n"),
    name: "donors.csv",
    status: 422,
    detail: `no column of the file is mapped to donor_code, sex, value; name the file's header for each in the mapping (its headers: ${Array.from({ length: 20 }, (_, i) => `"h${i + 1}"`).join(", ")} and 10 more)`,
    uploadError: "mapping",
    audited: true,
  },
  "a file name of 300 characters": {
    file: "utf8-bom.csv",
    name: `${"n".repeat(296)}.csv`,
    status: 422,
    detail: "file: The file name is 300 characters long; rename the file to at most 255 characters.",
    audited: false,
  },
  "a NUL character in the file name": {
    file: "utf8-bom.csv",
    name: "donors\u0000.csv",
    status: 422,
    detail: "file: the file name: the text holds the character U+0000 (NUL), which cannot be stored; remove it.",
    audited: false,
  },
  "a ZIP bomb: a workbook of 257 KB that unpacks to 257 MB": {
    file: "zip-bomb.xlsx",
    name: "donors.xlsx",
    status: 413,
    detail: "the workbook unpacks to more than 256 MB; save the donor results alone in a new workbook or as CSV",
    uploadError: "too_large",
    audited: true,
  },
  "200,001 data rows": {
    file: () => manyRowsCsv(200_001),
    name: "donors.csv",
    status: 413,
    detail: "the file has more than 200,000 data rows; split it into several uploads",
    uploadError: "too_many_rows",
    audited: true,
  },
  "a 25 MB file": {
    file: () => largeCsv(25 * 1024 * 1024),
    name: "donors.csv",
    status: 413,
    detail: "the file is larger than 20 MB; split it into several uploads",
    audited: false,
  },
};

describe("uploads refused whole", () => {
  let studyId: string;
  beforeAll(async () => {
    studyId = await openStudy("Bad input: refused uploads");
  });

  for (const [what, c] of Object.entries(refused)) {
    it(`refuses ${what} with ${c.status} and changes no table${c.audited ? " but the audit trail's record of it" : ""}`, async () => {
      const before = await countEveryTable(owner);
      const sent = await sendUpload(`/api/v1/studies/${studyId}/uploads`, scientist, bytesOf(c), c.name, c.fields);
      expectRefusal(sent, c.status, c.detail);
      if (c.uploadError) expect(sent.json!.uploadError).toBe(c.uploadError);
      expect(await countEveryTable(owner)).toEqual(grown(before, c.audited ? { audit_events: 1 } : {}));
      if (c.audited) {
        const [event] = (
          await pool.query("SELECT action, details->>'reason' AS reason FROM audit_events WHERE entity_id = $1 ORDER BY id DESC LIMIT 1", [studyId])
        ).rows;
        expect(event).toEqual({ action: "upload.refused", reason: c.detail });
      }
    });
  }

  it("refuses the same bad files at the preview route, storing nothing at all", async () => {
    for (const name of ["garbage.csv", "control-character.csv", "duplicate-header.csv", "utf16-no-bom.csv"]) {
      const c = Object.values(refused).find((r) => r.file === name && !r.fields)!;
      const before = await countEveryTable(owner);
      const sent = await sendUpload(`/api/v1/studies/${studyId}/uploads/preview`, scientist, bytesOf(c), c.name);
      expectRefusal(sent, c.status, c.detail);
      expect(await countEveryTable(owner)).toEqual(before);
    }
  });

  it("refuses an upload sent as JSON instead of multipart with 415, changing nothing", async () => {
    const before = await countEveryTable(owner);
    const sent = await sendRaw("POST", `/api/v1/studies/${studyId}/uploads`, { cookie: scientist }, {
      bytes: JSON.stringify({ file: "donor_code,sex,age_years,value\nD1,F,30,5.1" }),
      type: "application/json",
    });
    expectRefusal(sent, 415, "Send the request body as multipart/form-data.");
    expect(await countEveryTable(owner)).toEqual(before);
  });

  it("refuses a multipart body that is cut off with 400, changing nothing", async () => {
    const before = await countEveryTable(owner);
    const sent = await sendRaw("POST", `/api/v1/studies/${studyId}/uploads`, { cookie: scientist }, {
      bytes: '--XYZ\r\nContent-Disposition: form-data; name="file"; filename="d.csv"\r\n\r\ndonor_code,sex',
      type: "multipart/form-data; boundary=XYZ",
    });
    expectRefusal(sent, 400, "The request body is not valid multipart/form-data.");
    expect(await countEveryTable(owner)).toEqual(before);
  });
});

function bytesOf(c: Refused): Uint8Array | null {
  if (c.file === null) return null;
  return typeof c.file === "string" ? corpusFile(c.file) : c.file();
}

type StoredRow = [donorCode: string, sex: string, ageYears: number, value: number, censoring: string | null];

interface Accepted {
  file: string;
  name: string;
  fields?: Record<string, string>;
  rows: { total: number; valid: number; invalid: number };
  /** "row/column: message" for each problem, in order. */
  problems: string[];
  /** What the commit stores, in row order: donor code, sex, age in years, value, censoring ("<", "<=", ">", ">=" or null). */
  stored: StoredRow[];
  /** The format and sheet the report names. */
  format: "csv" | "xlsx";
  sheet?: string;
}

const NAMES: StoredRow[] = [
  ["Zoë", "F", 30, 5.1, null],
  ["Åsa", "M", 41, 5.3, null],
  ["李", "F", 52, 4.9, null],
];

const accepted: Record<string, Accepted> = {
  "UTF-8 with a byte-order mark": { file: "utf8-bom.csv", name: "donors.csv", format: "csv", rows: { total: 3, valid: 3, invalid: 0 }, problems: [], stored: NAMES },
  "UTF-16 little-endian with a byte-order mark and CRLF line ends": {
    file: "utf16le-bom.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 3, valid: 3, invalid: 0 },
    problems: [],
    stored: NAMES,
  },
  "UTF-16 big-endian with a byte-order mark": { file: "utf16be-bom.csv", name: "donors.csv", format: "csv", rows: { total: 3, valid: 3, invalid: 0 }, problems: [], stored: NAMES },
  "semicolon separators with decimal commas, declared": {
    file: "semicolon-decimal-comma.csv",
    name: "donors.csv",
    fields: { decimalComma: "true" },
    format: "csv",
    rows: { total: 3, valid: 3, invalid: 0 },
    problems: [],
    stored: [
      ["D1", "F", 30.5, 4.5, null],
      ["D2", "M", 41, 5.25, null],
      ["D3", "F", 52, 0.5, "<"],
    ],
  },
  "quoted fields holding line breaks, commas and quotes": {
    file: "quoted-newlines.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 3, valid: 3, invalid: 0 },
    problems: [],
    stored: [
      ["D1\nsecond line", "F", 30, 5.1, null],
      ["D2, with comma", "M", 41, 5.3, null],
      ['D3 "quoted"', "F", 52, 4.9, null],
    ],
  },
  "CRLF line ends and blank lines between and after rows": {
    file: "crlf-trailing-blanks.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 2, valid: 2, invalid: 0 },
    problems: [],
    stored: [
      ["D1", "F", 30, 5.1, null],
      ["D2", "M", 41, 5.3, null],
    ],
  },
  // Values: 1e309 overflows a double; NaN, Infinity, hexadecimal, a space as thousands separator
  // and the Unicode minus sign are not numbers in the template's rules; -0 is read as 0;
  // "+5.2", ".5", "5." and "1e-3" are plain decimal numbers (common practice, no source).
  "odd values: 1e309, NaN, -0, 4,5, <, >>3 and others": {
    file: "odd-values.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 18, valid: 9, invalid: 9 },
    problems: [
      '1/value: value "1e309" is too large to be a number',
      '2/value: value "NaN" is not a number',
      '4/value: value "4,5" has a decimal comma; if the file uses decimal commas, upload it with the decimal-comma option (decimalComma: true)',
      '5/value: value "<" has a censoring sign but no limit',
      '6/value: value ">>3" is not a number',
      '7/value: value "Infinity" is not a number',
      '8/value: value "0x1A" is not a number',
      '9/value: value "1 000" is not a number',
      '15/value: value "−1" is not a number',
    ],
    stored: [
      ["V3", "F", 30, 0, null],
      ["V10", "F", 30, 5.2, null],
      ["V11", "F", 30, 0.5, null],
      ["V12", "F", 30, 0.001, null],
      ["V13", "F", 30, 0.5, "<="],
      ["V14", "F", 30, 1000, ">"],
      ["V16", "F", 30, 5.1, null],
      ["V17", "F", 30, 5, null],
      ["V18", "F", 30, 1e308, null],
    ],
  },
  "spreadsheet formula text as donor codes": {
    file: "formula-text.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 7, valid: 7, invalid: 0 },
    problems: [],
    // Cells are trimmed (tests/uploads), so the leading tab and carriage return go.
    stored: [
      ["=cmd|' /C calc'!A0", "F", 30, 5.0, null],
      ["+SUM(1;2)", "F", 31, 5.1, null],
      ["-2+3", "F", 32, 5.2, null],
      ["@SUM(A1:A2)", "F", 33, 5.3, null],
      ['=HYPERLINK("http://example.invalid","x")', "F", 34, 5.4, null],
      ["TAB=1+1", "F", 35, 5.5, null],
      ["CR=1+1", "F", 36, 5.6, null],
    ],
  },
  "SQL and HTML fragments as donor codes": {
    file: "sql-html.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 5, valid: 5, invalid: 0 },
    problems: [],
    stored: [
      ["Robert'); DROP TABLE donor_results;--", "F", 30, 5.1, null],
      ["' OR '1'='1", "M", 31, 5.2, null],
      ["<script>alert('bw')</script>", "F", 32, 5.3, null],
      ["<img src=x onerror=alert(1)>", "M", 33, 5.4, null],
      ["&lt;b&gt;&amp;", "F", 34, 5.5, null],
    ],
  },
  "very long strings": {
    file: "long-strings.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 3, valid: 0, invalid: 3 },
    problems: [
      "1/donor_code: donor_code is 5000 characters long; at most 100 are allowed",
      `2/sex: sex "${"F".repeat(40)}…" (3000 characters) is not F, M, female or male`,
      `3/value: value "${"9".repeat(40)}…" (400 characters) is too large to be a number`,
    ],
    stored: [],
  },
  "dates outside the calendar, in another order, or after collection": {
    file: "odd-dates.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 5, valid: 2, invalid: 3 },
    problems: [
      '1/birth_date: birth_date "2023-02-29" is not a date in the calendar',
      "2/birth_date: birth_date 2027-01-01 is after collected_on 2026-01-05",
      '3/birth_date: birth_date "03/02/1990" is not an ISO 8601 date (YYYY-MM-DD)',
    ],
    // B4: born 29 Feb 1904, the birthday falls on 1 March in common years, so on 28 Feb 2024
    // 119 years and 364 of the 365 days from 1 Mar 2023 to 29 Feb 2024 have passed.
    // B5: born 29 Feb 2000, 1 March 2026 is the 26th birthday (common practice, DEVELOPERS.md "Uploads").
    stored: [
      ["B4", "M", 119 + 364 / 365, 5.4, null],
      ["B5", "F", 26, 5.5, null],
    ],
  },
  "sex and age out of range or in other words": {
    file: "odd-sex-age.csv",
    name: "donors.csv",
    format: "csv",
    rows: { total: 7, valid: 2, invalid: 5 },
    problems: [
      '1/sex: sex "x" is not F, M, female or male',
      "3/sex: sex is missing",
      "4/age_years: age_years -1 is negative",
      "5/age_years: age_years 121 is over 120 years",
      '6/age_years: age_years "abc" is not a number',
    ],
    stored: [
      ["S2", "F", 30, 5.1, null],
      ["S7", "M", 0, 5.1, null],
    ],
  },
  "an XLSX with formulas (their saved results are read)": {
    file: "formulas.xlsx",
    name: "donors.xlsx",
    format: "xlsx",
    sheet: "Donors",
    rows: { total: 4, valid: 3, invalid: 1 },
    problems: ["4/value: value is missing"],
    stored: [
      ["X1", "F", 30, 5.5, null],
      ["X2", "M", 41, 3, null],
      ["=1+1", "F", 52, 4.9, null],
    ],
  },
  "an XLSX with merged cells (the top-left cell only)": {
    file: "merged-cells.xlsx",
    name: "donors.xlsx",
    format: "xlsx",
    sheet: "Donors",
    rows: { total: 3, valid: 2, invalid: 1 },
    problems: ["2/sex: sex is missing"],
    stored: [
      ["M1", "F", 30, 5.1, null],
      ["M3", "M", 32, 5.3, null],
    ],
  },
  "an XLSX with several sheets, the second named": {
    file: "several-sheets.xlsx",
    name: "donors.xlsx",
    fields: { sheet: "Donors" },
    format: "xlsx",
    sheet: "Donors",
    rows: { total: 2, valid: 2, invalid: 0 },
    problems: [],
    stored: [
      ["W1", "F", 30, 5.1, null],
      ["W2", "M", 41, 5.3, null],
    ],
  },
  "a file named .txt that is CSV (the format comes from the bytes)": {
    file: "crlf-trailing-blanks.csv",
    name: "<b>donors</b>'; DROP TABLE uploads;--.txt",
    format: "csv",
    rows: { total: 2, valid: 2, invalid: 0 },
    problems: [],
    stored: [
      ["D1", "F", 30, 5.1, null],
      ["D2", "M", 41, 5.3, null],
    ],
  },
};

const CENSORING: Record<string, string> = { "below,false": "<", "below,true": "<=", "above,false": ">", "above,true": ">=" };

describe("awkward uploads accepted and read as written", () => {
  for (const [what, c] of Object.entries(accepted)) {
    it(`accepts ${what}`, async () => {
      const studyId = await openStudy(`Bad input: ${c.file}`);
      const before = await countEveryTable(owner);
      const sent: Sent = await sendUpload(`/api/v1/studies/${studyId}/uploads`, scientist, corpusFile(c.file), c.name, c.fields);
      expect(sent.status, JSON.stringify(sent.json)).toBe(201);
      const report = sent.json as { id: string; rows: unknown; format: string; sheet: string | null; fileName: string; problems: { row: number; column: string; message: string }[] };
      expect({ rows: report.rows, format: report.format, sheet: report.sheet, fileName: report.fileName }).toEqual({
        rows: c.rows,
        format: c.format,
        sheet: c.sheet ?? null,
        fileName: c.name,
      });
      expect(report.problems.map((p) => `${p.row}/${p.column}: ${p.message}`)).toEqual(c.problems);
      // A pending upload and its audit event, nothing else.
      expect(await countEveryTable(owner)).toEqual(grown(before, { uploads: 1, audit_events: 1 }));
      if (c.rows.valid === 0) return;

      const committed = await sendRaw("POST", `/api/v1/studies/${studyId}/uploads/${report.id}/commit`, { cookie: scientist });
      expect(committed.status).toBe(200);
      expect(await countEveryTable(owner)).toEqual(grown(before, { uploads: 1, audit_events: 2, donor_results: c.rows.valid }));
      const stored = (
        await pool.query(
          "SELECT donor_code, sex, age_years, value, censoring_side, censoring_inclusive FROM donor_results WHERE upload_id = $1 ORDER BY row_number",
          [report.id],
        )
      ).rows.map((r): StoredRow => [r.donor_code, r.sex, r.age_years, r.value, r.censoring_side ? CENSORING[`${r.censoring_side},${r.censoring_inclusive}`] : null]);
      expect(stored.map((r) => [r[0], r[1], r[3], r[4]])).toEqual(c.stored.map((r) => [r[0], r[1], r[3], r[4]]));
      // Ages to 12 significant digits: the expected fractions are written as quotients.
      expect(stored.map((r) => r[2].toPrecision(12))).toEqual(c.stored.map((r) => r[2].toPrecision(12)));
    });
  }
});
