/**
 * Times an upload of 200,000 healthy-donor rows end to end on the database: checking the CSV,
 * keeping it pending in PostgreSQL, and committing it into donor_results (COPY … FROM STDIN in one
 * transaction with the status change and the audit event), with the commit's steps apart. Prints
 * figures, asserts nothing. Against a running database, as the app's role:
 *   DATABASE_URL=postgres://… node --conditions react-server --import tsx scripts/bench-upload-commit.ts
 * It opens a study for the analyte GLU (seeded by the demo) and leaves it, with its results, behind.
 */
import { createHash } from "node:crypto";
import { eq } from "drizzle-orm";
import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { SYSTEM_ACTOR } from "../db/queries/audit";
import { commitUpload, createPendingUpload } from "../db/queries/uploads";
import * as schema from "../db/schema";
import { createRandom } from "../lib/stats/random";
import { convertUnit } from "../lib/units/ucum";
import { checkUpload } from "../lib/uploads";

const ROWS = 200_000;
const SEED = 20261202;

function csv(): string {
  const random = createRandom(SEED);
  const lines = ["donor_code,sex,age_years,birth_date,collected_on,value,unit"];
  for (let i = 0; i < ROWS; i++) {
    const u1 = 1 - random.nextFloat();
    const u2 = random.nextFloat();
    const z = Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
    const sex = random.nextFloat() < 0.5 ? "F" : "M";
    const age = (18 + 62 * random.nextFloat()).toFixed(1);
    const mgdl = i % 10 === 0;
    const value = Math.exp(1.6 + 0.12 * z) * (mgdl ? 18.0156 : 1);
    lines.push(`B${String(i + 1).padStart(6, "0")},${sex},${age},,2026-03-01,${value.toFixed(mgdl ? 0 : 2)},${mgdl ? "mg/dL" : ""}`);
  }
  return lines.join("\n");
}

async function main() {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error("Set DATABASE_URL to a running Bellwether database (the app's role).");
  const pool = new Pool({ connectionString: url, max: 2 });
  const database = drizzle(pool, { schema });
  try {
    const [analyte] = await database.select().from(schema.analytes).where(eq(schema.analytes.code, "GLU"));
    if (!analyte) throw new Error("The database has no analyte GLU: seed it first.");
    const [study] = await database.insert(schema.studies).values({ analyteId: analyte.id, title: `Benchmark ${new Date().toISOString()}` }).returning();
    const bytes = new TextEncoder().encode(csv());
    const file = { name: "bench.csv", sha256: createHash("sha256").update(bytes).digest("hex"), sizeBytes: bytes.byteLength };
    console.log(`${ROWS.toLocaleString("en")} rows, ${(bytes.byteLength / 1e6).toFixed(1)} MB of CSV`);

    let t = performance.now();
    const report = await checkUpload(bytes, {
      unit: analyte.unit,
      convertUnit: (value, from, to) => convertUnit({ value, from, to, molarMass: analyte.molarMass }),
    });
    console.log(`check:   ${(performance.now() - t).toFixed(0)} ms (${report.rows.valid} valid, ${report.rows.invalid} invalid)`);

    t = performance.now();
    const upload = await createPendingUpload(database, { studyId: study.id, file, report, actor: SYSTEM_ACTOR });
    console.log(`pending: ${(performance.now() - t).toFixed(0)} ms (rows kept as jsonb in uploads.pending_rows)`);

    const steps: string[] = [];
    t = performance.now();
    const { stored } = await commitUpload(database, {
      studyId: study.id,
      uploadId: upload.id,
      actor: SYSTEM_ACTOR,
      onStep: (step, ms) => steps.push(`${step} ${ms.toFixed(0)}`),
    });
    const ms = performance.now() - t;
    console.log(`commit:  ${ms.toFixed(0)} ms (${stored} donor results, ${Math.round(stored / (ms / 1000)).toLocaleString("en")} rows/s)`);
    console.log(`  steps (ms): ${steps.join(", ")}`);
    console.log("  lock: study and upload locked, file checked; read: pending rows fetched and parsed;");
    console.log("  copy: COPY text built and streamed; finish: status and audit event; commit: COMMIT");
  } finally {
    await pool.end();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
