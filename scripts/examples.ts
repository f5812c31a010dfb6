/**
 * Writes the example upload files under public/examples/ that a new user can try on a glucose
 * (GLU, mmol/L) study. Every donor is invented, drawn from the seeded generator, so the files are
 * the same on every run.
 *
 *   glucose-donors.csv                  150 donors in the template's columns; every row valid
 *   glucose-donors-other-headers.xlsx   120 donors under a laboratory export's headers (the value
 *                                       column must be mapped by hand), dates as date cells,
 *                                       some values in mg/dL (converted with glucose's molar mass)
 *   glucose-donors-with-problems.csv    30 rows, each problem the validation report names
 *   tsh-routine-results.csv             routine TSH results (m[IU]/L) of 4,000 invented patients for
 *                                       an indirect study: outpatients, inpatients and emergencies,
 *                                       repeat results and interference flags (db/demo-routine.ts)
 *
 * Run: npx tsx scripts/examples.ts
 */
import { writeFileSync } from "node:fs";
import path from "node:path";
import ExcelJS from "exceljs";
import { createRandom, type Random } from "../lib/stats/random";
import { DEMO_TSH_ROUTINE, routineCsv } from "../db/demo-routine";

const OUT = path.join(process.cwd(), "public", "examples");
/** mmol/L → mg/dL for glucose: 1 / 0.05551 (molar mass 180.156 g/mol, as in db/seed.ts). */
const MG_PER_DL_PER_MMOL_PER_L = 18.0156;

/** A standard normal draw (Box-Muller on the generator's uniforms). */
function normal(random: Random): number {
  const u1 = 1 - random.nextFloat();
  const u2 = random.nextFloat();
  return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
}

interface Donor {
  code: string;
  sex: "F" | "M";
  age: number;
  birth: Date;
  collected: Date;
  /** Fasting glucose in mmol/L: log-normal, slightly higher in men and with age (invented). */
  glucose: number;
}

const DAY = 86_400_000;
const iso = (d: Date) => d.toISOString().slice(0, 10);

function donors(seed: number, n: number, prefix: string): Donor[] {
  const random = createRandom(seed);
  const out: Donor[] = [];
  for (let i = 0; i < n; i++) {
    const sex = random.nextFloat() < 0.52 ? "F" : "M";
    const collected = new Date(Date.UTC(2026, 0, 5) + random.nextInt(70) * DAY);
    const ageDays = Math.round((18 + random.nextFloat() * 52) * 365.25);
    const birth = new Date(collected.getTime() - ageDays * DAY);
    const age = Math.round((ageDays / 365.25) * 10) / 10;
    const mu = Math.log(4.95) + (sex === "M" ? 0.03 : 0) + 0.0015 * (age - 40);
    out.push({ code: `${prefix}${String(i + 1).padStart(4, "0")}`, sex, age, birth, collected, glucose: Math.exp(mu + 0.085 * normal(random)) });
  }
  return out;
}

function csv(rows: (string | number)[][]): string {
  const field = (v: string | number) => (/[",\r\n]/.test(String(v)) ? `"${String(v).replace(/"/g, '""')}"` : String(v));
  return rows.map((r) => r.map(field).join(",")).join("\r\n") + "\r\n";
}

const HEADER = ["donor_code", "sex", "age_years", "birth_date", "collected_on", "value", "unit"];

function cleanCsv(): string {
  // Most rows give the age in years; every tenth gives the birth date instead (exact age from the dates).
  const rows = donors(20260302, 150, "GD").map((d, i) =>
    i % 10 === 9
      ? [d.code, d.sex, "", iso(d.birth), iso(d.collected), d.glucose.toFixed(2), "mmol/L"]
      : [d.code, d.sex, d.age, "", iso(d.collected), d.glucose.toFixed(2), i % 3 === 0 ? "mmol/L" : ""],
  );
  return csv([HEADER, ...rows]);
}

async function otherHeadersXlsx(): Promise<Buffer> {
  const workbook = new ExcelJS.Workbook();
  workbook.creator = "Bellwether examples";
  workbook.created = new Date(Date.UTC(2026, 2, 2));
  workbook.modified = workbook.created;
  const sheet = workbook.addWorksheet("Glucose donors", { views: [{ state: "frozen", ySplit: 1 }] });
  sheet.columns = [
    { header: "Sample ID", key: "id", width: 12 },
    { header: "Gender", key: "gender", width: 9 },
    { header: "Date of birth", key: "dob", width: 14, style: { numFmt: "yyyy-mm-dd" } },
    { header: "Drawn on", key: "drawn", width: 12, style: { numFmt: "yyyy-mm-dd" } },
    { header: "Fasting glucose", key: "result", width: 15 },
    { header: "Units", key: "units", width: 9 },
    { header: "Comment", key: "comment", width: 24 },
  ];
  sheet.getRow(1).font = { bold: true };
  donors(20260303, 120, "S-").forEach((d, i) => {
    const inMg = i % 8 === 3;
    sheet.addRow({
      id: d.code,
      gender: d.sex === "F" ? "female" : "male",
      dob: d.birth,
      drawn: d.collected,
      result: inMg ? Math.round(d.glucose * MG_PER_DL_PER_MMOL_PER_L) : Math.round(d.glucose * 100) / 100,
      units: inMg ? "mg/dL" : "mmol/L",
      comment: i % 17 === 0 ? "fasting confirmed by phone" : "",
    });
  });
  const about = workbook.addWorksheet("About");
  about.addRow(["Invented healthy-donor results for trying Bellwether; no real person is in this file."]);
  about.addRow(["The results are on the first sheet, under headers that are not Bellwether's template: map them when you upload."]);
  return Buffer.from(await workbook.xlsx.writeBuffer());
}

function problemsCsv(): string {
  const rows: (string | number)[][] = donors(20260304, 30, "PX").map((d) => [d.code, d.sex, d.age, "", iso(d.collected), d.glucose.toFixed(2), ""]);
  rows[2][5] = "n/a"; // not a number
  rows[5][5] = "<0.5"; // censored below 0.5: kept as censored, with its limit
  rows[9][0] = rows[8][0]; // the same donor code twice
  rows[12][1] = ""; // sex missing
  rows[15][2] = 212; // an impossible age
  rows[18][6] = "U/L"; // a unit UCUM cannot convert to mmol/L
  rows[21][5] = "5,31"; // a decimal comma, without the option
  rows[24][5] = "81"; // in mg/dL: converted with glucose's molar mass
  rows[24][6] = "mg/dL";
  return csv([HEADER, ...rows]);
}

async function main() {
  writeFileSync(path.join(OUT, "glucose-donors.csv"), cleanCsv());
  writeFileSync(path.join(OUT, "glucose-donors-other-headers.xlsx"), await otherHeadersXlsx());
  writeFileSync(path.join(OUT, "glucose-donors-with-problems.csv"), problemsCsv());
  writeFileSync(path.join(OUT, "tsh-routine-results.csv"), routineCsv({ ...DEMO_TSH_ROUTINE, seed: 3101, keyPrefix: "EX", patients: 4000 }));
  console.log(`Wrote the example files to ${OUT}`);
}

void main();
