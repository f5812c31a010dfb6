/**
 * Carries out the demo's studies (db/demo-studies.ts) through the queries the API itself uses,
 * so that the demo holds exactly what a scientist working in the app would have produced. Each
 * step first looks for what it would make and skips it when present: seeding twice changes
 * nothing, and a seed stopped half-way finishes on the next start.
 */
import { createHash } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { convertUnit } from "@/lib/units/ucum";
import { checkUpload } from "@/lib/uploads";
import type { Database } from "./client";
import { cohortCsv } from "./demo-donors";
import { DEMO_STAGES, DEMO_STUDIES, type DemoStage, type DemoStudy } from "./demo-studies";
import { findAnalyteByCode } from "./queries/analytes";
import type { Actor } from "./queries/audit";
import { createStudy } from "./queries/studies";
import { commitUpload, createPendingUpload } from "./queries/uploads";
import { analytes, studies, uploads, type Study } from "./schema";

/** The demo's people as the audit trail names them: the scientist does the work, the director signs. */
export interface DemoActors {
  scientist: Actor;
  director: Actor;
}

export function reached(study: DemoStudy, stage: DemoStage): boolean {
  return DEMO_STAGES.indexOf(study.stage) >= DEMO_STAGES.indexOf(stage);
}

async function ensureStudy(database: Database, spec: DemoStudy, actor: Actor): Promise<{ study: Study; added: boolean }> {
  const [found] = await database
    .select({ study: studies })
    .from(studies)
    .innerJoin(analytes, eq(analytes.id, studies.analyteId))
    .where(and(eq(analytes.code, spec.analyte), eq(studies.title, spec.title)))
    .limit(1);
  if (found) return { study: found.study, added: false };
  const study = await createStudy(database, {
    input: {
      analyte: spec.analyte,
      title: spec.title,
      method: spec.method,
      criteria: spec.criteria,
      collectedFrom: spec.cohort.collected[0],
      collectedTo: spec.cohort.collected[1],
    },
    actor,
  });
  return { study, added: true };
}

/** Checks the cohort's file as the upload route does, keeps it pending and commits it, unless it is committed already. */
async function ensureDonorResults(database: Database, spec: DemoStudy, study: Study, actor: Actor): Promise<boolean> {
  const bytes = new TextEncoder().encode(cohortCsv(spec.cohort));
  const sha256 = createHash("sha256").update(bytes).digest("hex");
  const [committed] = await database
    .select({ id: uploads.id })
    .from(uploads)
    .where(and(eq(uploads.studyId, study.id), eq(uploads.sha256, sha256), eq(uploads.status, "committed")))
    .limit(1);
  if (committed) return false;
  const analyte = await findAnalyteByCode(database, { code: spec.analyte });
  if (!analyte) throw new Error(`The demo study "${spec.title}" needs the analyte ${spec.analyte}.`);
  const report = await checkUpload(bytes, {
    unit: analyte.unit,
    convertUnit: (value, from, to) => convertUnit({ value, from, to, molarMass: analyte.molarMass }),
  });
  if (report.rows.invalid > 0) {
    throw new Error(`The demo file ${spec.fileName} has problems: ${JSON.stringify(report.problems.slice(0, 3))}`);
  }
  const file = { name: spec.fileName, sha256, sizeBytes: bytes.byteLength };
  const upload = await createPendingUpload(database, { studyId: study.id, file, report, actor });
  await commitUpload(database, { studyId: study.id, uploadId: upload.id, actor });
  return true;
}

/** Seeds every demo study as far as its stage; returns whether it added anything. */
export async function seedDemoStudies(database: Database, actors: DemoActors): Promise<boolean> {
  let added = false;
  for (const spec of DEMO_STUDIES) {
    const { study, added: opened } = await ensureStudy(database, spec, actors.scientist);
    const uploaded = await ensureDonorResults(database, spec, study, actors.scientist);
    added ||= opened || uploaded;
  }
  return added;
}
