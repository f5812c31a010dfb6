/**
 * Time checking a 200,000-row healthy-donor upload, as CSV (target: well under 1 s) and as
 * XLSX (no target), generated here from a seeded generator. Prints figures, asserts nothing.
 * Run: npx tsx scripts/bench-uploads.ts
 */
import { PassThrough } from "node:stream";
import ExcelJS from "exceljs";
import { checkUpload, TEMPLATE_COLUMNS, type ValidationReport } from "../lib/uploads";
import { createRandom } from "../lib/stats/random";

const ROWS = 200_000;
const SEED = 20260302;

type Row = [string, string, number | "", string, string, string, string];

/** Donors aged 18–80, half by age_years and half by birth date; log-normal values; 1% censored. */
function donorRows(): Row[] {
  const random = createRandom(SEED);
  const rows: Row[] = [];
  for (let i = 0; i < ROWS; i++) {
    const code = `D${String(i + 1).padStart(6, "0")}`;
    const sex = random.nextFloat() < 0.5 ? "F" : "M";
    const u1 = 1 - random.nextFloat();
    const u2 = random.nextFloat();
    const z = Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
    const value = Math.exp(1.5 + 0.2 * z).toFixed(2);
    const censored = random.nextFloat() < 0.01 ? "<2.5" : value;
    const collected = new Date(Date.UTC(2026, 0, 1) + random.nextInt(365) * 86_400_000);
    if (i % 2 === 0) {
      const age = Math.round((18 + 62 * random.nextFloat()) * 10) / 10;
      rows.push([code, sex, age, "", collected.toISOString().slice(0, 10), censored, "mmol/L"]);
    } else {
      const birth = new Date(collected.getTime() - (18 * 365 + random.nextInt(62 * 365)) * 86_400_000);
      rows.push([code, sex, "", birth.toISOString().slice(0, 10), collected.toISOString().slice(0, 10), censored, ""]);
    }
  }
  return rows;
}

async function xlsxOf(rows: Row[]): Promise<Buffer> {
  const out = new PassThrough();
  const chunks: Buffer[] = [];
  out.on("data", (c: Buffer) => chunks.push(c));
  const workbook = new ExcelJS.stream.xlsx.WorkbookWriter({ stream: out, useSharedStrings: false, useStyles: true });
  const sheet = workbook.addWorksheet("Donor results");
  sheet.addRow([...TEMPLATE_COLUMNS]).commit();
  for (const [code, sex, age, birth, collected, value, unit] of rows) {
    const row = sheet.addRow([code, sex, age === "" ? null : age, birth === "" ? null : new Date(birth), new Date(collected), Number.isNaN(Number(value)) ? value : Number(value), unit || null]);
    row.getCell(4).numFmt = "yyyy-mm-dd";
    row.getCell(5).numFmt = "yyyy-mm-dd";
    row.commit();
  }
  sheet.commit();
  await workbook.commit();
  return Buffer.concat(chunks);
}

async function time(label: string, bytes: Buffer, runs: number): Promise<void> {
  let report: ValidationReport | null = null;
  const ms: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = process.hrtime.bigint();
    const c0 = process.cpuUsage();
    report = await checkUpload(bytes, { unit: "mmol/L" });
    const c = process.cpuUsage(c0);
    ms.push(Number(process.hrtime.bigint() - t0) / 1e6);
    cpu.push((c.user + c.system) / 1e3);
  }
  const { total, valid, invalid } = report!.rows;
  console.log(
    `${label}: ${(bytes.byteLength / 1e6).toFixed(1)} MB, ${total.toLocaleString("en")} rows (${valid.toLocaleString("en")} valid, ${invalid} invalid), ` +
      `best of ${runs} ${Math.min(...ms).toFixed(0)} ms (runs ${ms.map((v) => v.toFixed(0)).join(", ")} ms; ` +
      `CPU time of the process, garbage collection included, ${cpu.map((v) => v.toFixed(0)).join(", ")} ms)`,
  );
}

async function main(): Promise<void> {
  const rows = donorRows();
  const csv = Buffer.from(`${TEMPLATE_COLUMNS.join(",")}\n${rows.map((r) => r.join(",")).join("\n")}\n`);
  await checkUpload(csv.subarray(0, 2_000_000), { unit: "mmol/L" }).catch(() => undefined); // warm-up
  await time("CSV (target well under 1 s)", csv, 5);
  const xlsx = await xlsxOf(rows);
  await time("XLSX (streaming reader, no target)", xlsx, 2);
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
