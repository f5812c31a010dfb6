/**
 * The blank template, as CSV text and as an XLSX workbook: the header row and one example row.
 *
 * The example row is marked by its donor code, EXAMPLE, in both formats (the workbook also
 * shows it grey and italic, with a note). A mark inside the data is the only one that survives
 * every way a scientist may fill the template in: a comment line or a note beside the columns
 * is lost or misread once the file passes through another spreadsheet program, whereas the
 * checker recognises the code and reports the row ("delete it"), so an example left in can
 * never be stored as a donor result.
 */
import ExcelJS from "exceljs";
import { EXAMPLE_DONOR_CODE, ROUTINE_COLUMNS, TEMPLATE_COLUMNS } from "./columns";

export interface TemplateOptions {
  /** The analyte's unit, written in the example row. */
  unit: string;
  /** The example row's value (default 4.5). */
  exampleValue?: number;
  /** The routine-results template of an indirect study (ROUTINE_COLUMNS) instead of the healthy-donor one. */
  routine?: boolean;
}

const EXAMPLE_AGE = 42;
const EXAMPLE_COLLECTED_ON = "2026-03-02";

function csvField(text: string): string {
  return /[",;\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** The template as CSV text (comma-separated, CRLF line ends as spreadsheets write them). */
export function templateCsv(options: TemplateOptions): string {
  if (options.routine) {
    const row = [EXAMPLE_DONOR_CODE, "F", String(EXAMPLE_AGE), "", `${EXAMPLE_COLLECTED_ON}T08:15`, String(options.exampleValue ?? 4.5), options.unit, "outpatient", ""];
    return `${ROUTINE_COLUMNS.join(",")}\r\n${row.map(csvField).join(",")}\r\n`;
  }
  const example = [EXAMPLE_DONOR_CODE, "F", String(EXAMPLE_AGE), "", EXAMPLE_COLLECTED_ON, String(options.exampleValue ?? 4.5), options.unit];
  return `${TEMPLATE_COLUMNS.join(",")}\r\n${example.map(csvField).join(",")}\r\n`;
}

/** The template as an XLSX workbook: one sheet, "Donor results", with date cells for the dates. */
export async function templateXlsx(options: TemplateOptions): Promise<Buffer> {
  const workbook = new ExcelJS.Workbook();
  workbook.creator = "Bellwether";
  if (options.routine) return routineTemplateXlsx(workbook, options);
  const sheet = workbook.addWorksheet("Donor results", { views: [{ state: "frozen", ySplit: 1 }] });
  sheet.columns = TEMPLATE_COLUMNS.map((key) => ({ header: key, key, width: key === "donor_code" ? 14 : 13 }));
  sheet.getRow(1).font = { bold: true };
  const [y, m, d] = EXAMPLE_COLLECTED_ON.split("-").map(Number);
  const example = sheet.addRow({
    donor_code: EXAMPLE_DONOR_CODE,
    sex: "F",
    age_years: EXAMPLE_AGE,
    collected_on: new Date(Date.UTC(y, m - 1, d)),
    value: options.exampleValue ?? 4.5,
    unit: options.unit,
  });
  example.font = { italic: true, color: { argb: "FF808080" } };
  sheet.getColumn("birth_date").numFmt = "yyyy-mm-dd";
  sheet.getColumn("collected_on").numFmt = "yyyy-mm-dd";
  example.getCell("collected_on").numFmt = "yyyy-mm-dd";
  example.getCell("donor_code").note =
    "Example row: Bellwether refuses a row with donor code EXAMPLE. Delete this row and enter one row per donor. " +
    "Give age_years, or birth_date and collected_on (YYYY-MM-DD); unit may stay empty for the analyte's unit.";
  return Buffer.from(await workbook.xlsx.writeBuffer());
}

/** The routine-results template: one sheet, "Routine results", the collection time as a date-time cell. */
async function routineTemplateXlsx(workbook: ExcelJS.Workbook, options: TemplateOptions): Promise<Buffer> {
  const sheet = workbook.addWorksheet("Routine results", { views: [{ state: "frozen", ySplit: 1 }] });
  sheet.columns = ROUTINE_COLUMNS.map((key) => ({ header: key, key, width: key === "collected_at" ? 18 : 13 }));
  sheet.getRow(1).font = { bold: true };
  const [y, m, d] = EXAMPLE_COLLECTED_ON.split("-").map(Number);
  const example = sheet.addRow({
    patient_key: EXAMPLE_DONOR_CODE,
    sex: "F",
    age_years: EXAMPLE_AGE,
    collected_at: new Date(Date.UTC(y, m - 1, d, 8, 15)),
    value: options.exampleValue ?? 4.5,
    unit: options.unit,
    setting: "outpatient",
  });
  example.font = { italic: true, color: { argb: "FF808080" } };
  sheet.getColumn("birth_date").numFmt = "yyyy-mm-dd";
  sheet.getColumn("collected_at").numFmt = "yyyy-mm-dd hh:mm";
  example.getCell("collected_at").numFmt = "yyyy-mm-dd hh:mm";
  example.getCell("patient_key").note =
    "Example row: Bellwether refuses a row with patient key EXAMPLE. Delete this row and enter one row per result, " +
    "several per patient if need be. Use a pseudonymous key, never a name or record number. Give age_years, or birth_date; " +
    "collected_at as YYYY-MM-DDTHH:MM local time; flags separated by semicolons.";
  return Buffer.from(await workbook.xlsx.writeBuffer());
}
