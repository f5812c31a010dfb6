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
import { EXAMPLE_DONOR_CODE, TEMPLATE_COLUMNS } from "./columns";

export interface TemplateOptions {
  /** The analyte's unit, written in the example row. */
  unit: string;
  /** The example row's value (default 4.5). */
  exampleValue?: number;
}

const EXAMPLE_AGE = 42;
const EXAMPLE_COLLECTED_ON = "2026-03-02";

function csvField(text: string): string {
  return /[",;\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** The template as CSV text (comma-separated, CRLF line ends as spreadsheets write them). */
export function templateCsv(options: TemplateOptions): string {
  const example = [EXAMPLE_DONOR_CODE, "F", String(EXAMPLE_AGE), "", EXAMPLE_COLLECTED_ON, String(options.exampleValue ?? 4.5), options.unit];
  return `${TEMPLATE_COLUMNS.join(",")}\r\n${example.map(csvField).join(",")}\r\n`;
}

/** The template as an XLSX workbook: one sheet, "Donor results", with date cells for the dates. */
export async function templateXlsx(options: TemplateOptions): Promise<Buffer> {
  const workbook = new ExcelJS.Workbook();
  workbook.creator = "Bellwether";
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
