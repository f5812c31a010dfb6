/**
 * The validation report of an upload: every data row checked, before anything is stored.
 */
import { EXAMPLE_DONOR_CODE, ROUTINE_COLUMNS, TEMPLATE_COLUMNS, type Cell, type ColumnMapping, type UploadColumn } from "./columns";
import { UploadError } from "./errors";
import { collectBytes, sniffFile, type UploadInput } from "./input";
import { resolveColumns, type ResolvedMapping } from "./mapping";
import { readTable, type TableInfo } from "./table";
import {
  cellText,
  exactAgeYears,
  MAX_SETTING_LENGTH,
  quoted,
  readDateCell,
  readDateTimeCell,
  readFlagsCell,
  readNumberText,
  readSexCell,
  readValueCell,
  type DateTimeOut,
  type DayOut,
  type ValueOut,
} from "./values";

/** More data rows than this and the file is refused whole. */
export const MAX_DATA_ROWS = 200_000;
/** The report lists at most this many problems; `problemsOmitted` counts the rest. */
export const MAX_LISTED_PROBLEMS = 10_000;
/** The longest donor code: codes are pseudonyms or sample numbers, never free text. */
export const MAX_DONOR_CODE_LENGTH = 100;
/** The oldest possible donor. */
export const MAX_AGE_YEARS = 120;
/** Days per year for an age given in years (the Julian year). */
export const DAYS_PER_YEAR = 365.25;

/**
 * Converts a value from the file's unit to the analyte's. The caller supplies it (through
 * UCUM); it returns the converted value, or throws an Error whose message is reported as the
 * row's problem.
 */
export type ConvertUnit = (value: number, fromUnit: string, toUnit: string) => number;

export interface UploadProgress {
  /** Data rows checked so far. */
  rowsChecked: number;
  /** Bytes of the file read so far, and in all (for CSV, estimated from the characters parsed). */
  bytesRead: number;
  totalBytes: number;
}

export interface CheckOptions {
  /** The analyte's unit (UCUM); a row without a unit is in this unit. */
  unit: string;
  /** Template column → the file's header, when they differ. */
  mapping?: ColumnMapping;
  /** The file writes decimals with a comma (4,5). Without it a decimal comma is a problem. */
  decimalComma?: boolean;
  /** XLSX: the sheet to read (default the first in tab order). */
  sheet?: string;
  convertUnit?: ConvertUnit;
  /** Called every 2,000 rows or so, and once at the end. */
  onProgress?: (progress: UploadProgress) => void;
  /**
   * Read routine results (an indirect study's file, ROUTINE_COLUMNS): a patient key that may
   * repeat, the collection date and time, setting and flags. Default: healthy-donor results.
   */
  routine?: boolean;
}

export type CensoringSide = "below" | "above";

/** One valid donor result, ready to store. */
export interface DonorRow {
  /** Data row in the file, from 1 (the header not counted). */
  row: number;
  donorCode: string;
  sex: "F" | "M";
  /** Age at collection in years (may be fractional) and in whole days. */
  ageYears: number;
  ageDays: number;
  /** Whether the age came from age_years or was computed from birth_date and collected_on. */
  ageFrom: "age_years" | "dates";
  /** ISO 8601 dates, when given. */
  birthDate: string | null;
  collectedOn: string | null;
  /** In `unit`; for a censored value, its limit. */
  value: number;
  /** null for a measured value; `<0.5` is {side: "below", inclusive: false}, `>=1000` {side: "above", inclusive: true}. */
  censoring: { side: CensoringSide; inclusive: boolean } | null;
  /** Always the analyte's unit. */
  unit: string;
  /** When the file gave another unit: that unit and the value (or limit) as written. */
  conversion: { fromUnit: string; value: number } | null;
  /** Routine results only (else null): collection date and time "YYYY-MM-DDTHH:MM:SS", setting, flags. */
  collectedAt?: string | null;
  setting?: string | null;
  flags?: string[] | null;
}

export interface UploadProblem {
  row: number;
  column: UploadColumn;
  message: string;
}

export interface ValidationReport {
  format: "csv" | "xlsx";
  separator: "," | ";" | null;
  sheet: string | null;
  headers: string[];
  mapping: ResolvedMapping;
  rows: { total: number; valid: number; invalid: number };
  /** In row order; at most MAX_LISTED_PROBLEMS. */
  problems: UploadProblem[];
  problemsOmitted: number;
  validRows: DonorRow[];
}

const CENSORING: readonly (DonorRow["censoring"])[] = [
  null,
  { side: "below", inclusive: false },
  { side: "below", inclusive: true },
  { side: "above", inclusive: false },
  { side: "above", inclusive: true },
];

function rowList(rows: readonly number[]): string {
  if (rows.length === 2) return `rows ${rows[0]} and ${rows[1]}`;
  return `rows ${rows.slice(0, -1).join(", ")} and ${rows[rows.length - 1]}`;
}

/**
 * A workbook read from its first sheet whose columns do not fit: the donors are often on another
 * sheet, so the refusal names the sheet read and the others.
 */
function withSheetAdvice(error: unknown, table: TableInfo, sheetAsked: string | undefined): unknown {
  if (!(error instanceof UploadError) || error.code !== "mapping") return error;
  if (table.format !== "xlsx" || sheetAsked !== undefined || table.sheets.length < 2) return error;
  return new UploadError(
    "mapping",
    `${error.message} (read from the sheet ${quoted(table.sheet ?? "")}; the workbook's sheets are ${table.sheets.map(quoted).join(", ")}: name the sheet to read in the sheet field)`,
    { ...error.details, sheets: table.sheets },
  );
}

/** Nothing but blank rows: in a workbook, the sheet read is what is empty. */
export function emptyRefusal(format: "csv" | "xlsx", sheet: string | undefined): UploadError {
  return new UploadError("empty", format === "xlsx" && sheet !== undefined ? `the sheet ${quoted(sheet)} is empty` : "the file is empty");
}

/**
 * Reads an upload and checks every data row. Never stores anything.
 * Throws UploadError for a file refused whole (see errors.ts for the codes).
 * Complexity O(rows × columns).
 */
export async function checkUpload(input: UploadInput, options: CheckOptions): Promise<ValidationReport> {
  const { unit: analyteUnit, decimalComma = false, convertUnit, onProgress, routine = false } = options;
  const columns = routine ? ROUTINE_COLUMNS : TEMPLATE_COLUMNS;
  // The column that names the person, and the one that dates the result.
  const codeColumn = routine ? "patient_key" : "donor_code";
  const dateColumn = routine ? "collected_at" : "collected_on";
  const bytes = await collectBytes(input);
  const file = sniffFile(bytes);
  const totalBytes = bytes.byteLength;
  let bytesRead = 0;
  let rowsChecked = 0;
  const report = () => onProgress?.({ rowsChecked, bytesRead, totalBytes });

  let info: TableInfo | null = null;
  let index: Record<UploadColumn, number> | null = null;
  let mapping: ResolvedMapping | null = null;
  const problems: UploadProblem[] = [];
  let problemsOmitted = 0;
  const validRows: DonorRow[] = [];
  // Rows with a problem, so that a duplicate found later can mark an earlier valid row invalid.
  const invalidRows = new Set<number>();
  const rowsOfCode = new Map<string, number | number[]>();
  let total = 0;

  const problem = (row: number, column: UploadColumn, message: string) => {
    invalidRows.add(row);
    if (problems.length < MAX_LISTED_PROBLEMS) problems.push({ row, column, message });
    else problemsOmitted++;
  };
  // The row being checked, and whether it has a problem yet (one closure for all rows).
  let currentRow = 0;
  let ok = true;
  const fail = (column: UploadColumn, message: string) => {
    ok = false;
    problem(currentRow, column, message);
  };

  const value: ValueOut = { value: 0, censor: 0 };
  const num = { value: 0 };
  const birth: DayOut = { day: 0, y: 0, m: 0, d: 0, iso: "" };
  const collected: DateTimeOut = { day: 0, y: 0, m: 0, d: 0, iso: "", seconds: 0, isoDateTime: "" };
  const cell = (cells: readonly Cell[], i: number): Cell => (i === -1 ? null : cells[i]);

  const found = await readTable(file, options.sheet, {
    onHeader: (table) => {
      info = table;
      try {
        ({ index, mapping } = resolveColumns(table.headers, options.mapping, columns));
      } catch (error) {
        throw withSheetAdvice(error, table, options.sheet);
      }
    },
    onBytes: (n) => {
      bytesRead = n;
    },
    onRow: (cells, row) => {
      total++;
      if (total > MAX_DATA_ROWS) {
        throw new UploadError("too_many_rows", `the file has more than 200,000 data rows; split it into several uploads`);
      }
      const ix = index!;
      currentRow = row;
      ok = true;

      const donorCode = cellText(cell(cells, ix[codeColumn]));
      if (donorCode === "") fail(codeColumn, `${codeColumn} is missing`);
      else if (donorCode.length > MAX_DONOR_CODE_LENGTH) {
        fail(codeColumn, `${codeColumn} is ${donorCode.length} characters long; at most ${MAX_DONOR_CODE_LENGTH} are allowed`);
      }
      else if (donorCode.length === EXAMPLE_DONOR_CODE.length && donorCode.toUpperCase() === EXAMPLE_DONOR_CODE) {
        fail(codeColumn, "this is the template's example row; delete it before uploading");
      } else if (!routine) {
        const seen = rowsOfCode.get(donorCode);
        if (seen === undefined) rowsOfCode.set(donorCode, row);
        else if (typeof seen === "number") rowsOfCode.set(donorCode, [seen, row]);
        else seen.push(row);
      }

      const sex = readSexCell(cell(cells, ix.sex));
      if (sex !== "F" && sex !== "M") fail("sex", sex);

      // Age: from birth_date and the collection date when both are given, else from age_years.
      const birthText = cellText(cell(cells, ix.birth_date));
      const collectedText = cellText(cell(cells, ix[dateColumn]));
      let birthOk = false;
      let collectedOk = false;
      if (birthText !== "") {
        const m = readDateCell(cell(cells, ix.birth_date), "birth_date", birth);
        if (m !== null) fail("birth_date", m);
        else birthOk = true;
      }
      if (collectedText !== "") {
        const m = routine
          ? readDateTimeCell(cell(cells, ix.collected_at), "collected_at", collected)
          : readDateCell(cell(cells, ix.collected_on), "collected_on", collected);
        if (m !== null) fail(dateColumn, m);
        else collectedOk = true;
      } else if (routine) {
        fail("collected_at", "collected_at is missing; the collection date and time order a patient's results");
      }
      let ageYears = NaN;
      let ageDays = NaN;
      let ageFrom: DonorRow["ageFrom"] = "age_years";
      const ageText = cellText(cell(cells, ix.age_years));
      if (birthText !== "" && collectedText !== "") {
        ageFrom = "dates";
        if (birthOk && collectedOk) {
          if (birth.day > collected.day) {
            fail("birth_date", `birth_date ${birth.iso} is after ${dateColumn} ${collected.iso}`);
          } else {
            ageDays = collected.day - birth.day;
            ageYears = exactAgeYears(birth, collected);
            if (ageYears > MAX_AGE_YEARS) fail("birth_date", `the age from birth_date and ${dateColumn} is over ${MAX_AGE_YEARS} years`);
          }
        }
      } else if (ageText !== "") {
        const ageCell = cell(cells, ix.age_years);
        const m =
          typeof ageCell === "number"
            ? ((num.value = ageCell + 0), null)
            : readNumberText(ageText, decimalComma, "age_years", num);
        if (m !== null) fail("age_years", m);
        else if (num.value < 0) fail("age_years", `age_years ${ageText} is negative`);
        else if (num.value > MAX_AGE_YEARS) fail("age_years", `age_years ${ageText} is over ${MAX_AGE_YEARS} years`);
        else {
          ageYears = num.value;
          ageDays = Math.round(num.value * DAYS_PER_YEAR);
        }
      } else if (birthText !== "") {
        if (!routine) fail("collected_on", "collected_on is missing; the age is computed from birth_date and collected_on");
      } else {
        fail("age_years", `age is missing: give age_years, or birth_date and ${dateColumn}`);
      }

      let setting: string | null = null;
      let flags: string[] | null = null;
      if (routine) {
        setting = cellText(cell(cells, ix.setting)) || null;
        if (setting !== null && setting.length > MAX_SETTING_LENGTH) {
          fail("setting", `setting is ${setting.length} characters long; at most ${MAX_SETTING_LENGTH} are allowed`);
        }
        const read = readFlagsCell(cell(cells, ix.flags), "flags");
        if (typeof read === "string") fail("flags", read);
        else flags = read;
      }

      let conversion: DonorRow["conversion"] = null;
      const valueMessage = readValueCell(cell(cells, ix.value), decimalComma, value);
      if (valueMessage !== null) fail("value", valueMessage);
      const fileUnit = cellText(cell(cells, ix.unit));
      if (fileUnit !== "" && fileUnit !== analyteUnit) {
        if (convertUnit === undefined) {
          fail("unit", `unit ${quoted(fileUnit)} is not the analyte's unit "${analyteUnit}", and no conversion is available`);
        } else if (valueMessage === null) {
          let converted: number;
          try {
            converted = convertUnit(value.value, fileUnit, analyteUnit);
          } catch (error) {
            converted = NaN;
            fail("unit", error instanceof Error ? error.message : String(error));
          }
          if (ok && !Number.isFinite(converted)) {
            fail("unit", `converting ${value.value} ${fileUnit} to ${analyteUnit} gave no finite number`);
          }
          if (ok) {
            conversion = { fromUnit: fileUnit, value: value.value };
            value.value = converted;
          }
        }
      }

      if (ok) {
        validRows.push({
          row,
          donorCode,
          sex: sex as "F" | "M",
          ageYears,
          ageDays,
          ageFrom,
          birthDate: birthOk ? birth.iso : null,
          collectedOn: collectedOk ? collected.iso : null,
          collectedAt: routine && collectedOk ? collected.isoDateTime : null,
          setting,
          flags: routine ? flags : null,
          value: value.value,
          censoring: CENSORING[value.censor],
          unit: analyteUnit,
          conversion,
        });
      }
      rowsChecked++;
      if ((rowsChecked & 2047) === 0) report();
    },
  });
  if (!found || info === null) throw emptyRefusal(file.format, options.sheet);
  if (total === 0) throw new UploadError("no_data_rows", "the file has a header row but no data rows");

  // Duplicate donor codes: every row of the code is named, and none of them is valid.
  let duplicates = false;
  for (const [code, rows] of rowsOfCode) {
    if (typeof rows === "number") continue;
    duplicates = true;
    const message = `donor code ${quoted(code)} appears in ${rowList(rows)}`;
    for (const row of rows) problem(row, "donor_code", message);
  }
  if (duplicates) problems.sort((a, b) => a.row - b.row);
  const keep = validRows.filter((r) => !invalidRows.has(r.row));
  bytesRead = totalBytes;
  report();
  const table = info as TableInfo;
  return {
    format: table.format,
    separator: table.separator,
    sheet: table.sheet,
    headers: table.headers,
    mapping: mapping!,
    rows: { total, valid: keep.length, invalid: total - keep.length },
    problems,
    problemsOmitted,
    validRows: keep,
  };
}
