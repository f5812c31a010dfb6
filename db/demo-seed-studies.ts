/**
 * Carries out the demo's studies (db/demo-studies.ts) through the queries the API itself uses,
 * so that the demo holds exactly what a scientist working in the app would have produced. Each
 * step first looks for what it would make and skips it when present: seeding twice changes
 * nothing, and a seed stopped half-way finishes on the next start.
 */
import { createHash } from "node:crypto";
import { and, asc, count, eq, inArray } from "drizzle-orm";
import { partitionsOfPlan } from "@/lib/studies/partitions";
import { convertUnit } from "@/lib/units/ucum";
import { ageCurveReport } from "@/lib/studies/age-curve-rows";
import { checkUpload } from "@/lib/uploads";
import type { Database } from "./client";
import { cohortCsv } from "./demo-donors";
import { routineCsv } from "./demo-routine";
import { DEMO_STAGES, DEMO_STUDIES, type DemoStage, type DemoStudy } from "./demo-studies";
import { findAnalyteByCode } from "./queries/analytes";
import type { Actor } from "./queries/audit";
import { createLmsEstimate } from "./queries/age-curve-estimates";
import { createEstimate } from "./queries/estimates";
import { createIndirectEstimate } from "./queries/indirect-estimates";
import { createExclusions } from "./queries/exclusions";
import { DEMO_USERS } from "./demo-accounts";
import { createIntervalVersion } from "./queries/interval-versions";
import { signIntervalVersion, submitIntervalVersion } from "./queries/version-moves";
import { createOutlierDecision } from "./queries/outlier-decisions";
import { createPartitionAssessment } from "./queries/partition-assessments";
import { screenEvidenceOf, screenStudy } from "./queries/screens";
import { createStudy, setPartitionPlan } from "./queries/studies";
import { commitUpload, createPendingUpload } from "./queries/uploads";
import {
  analytes,
  auditEvents,
  donorResults,
  estimates,
  intervalVersions,
  partitionAssessments,
  studies,
  uploads,
  type Study,
} from "./schema";

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
      kind: spec.kind ?? "direct",
      method: spec.method,
      criteria: spec.criteria,
      collectedFrom: (spec.routine ?? spec.cohort!).collected[0],
      collectedTo: (spec.routine ?? spec.cohort!).collected[1],
    },
    actor,
  });
  return { study, added: true };
}

/** Checks the cohort's file as the upload route does, keeps it pending and commits it, unless it is committed already. */
async function ensureDonorResults(database: Database, spec: DemoStudy, study: Study, actor: Actor): Promise<boolean> {
  const bytes = new TextEncoder().encode(spec.routine ? routineCsv(spec.routine) : cohortCsv(spec.cohort!));
  const sha256 = createHash("sha256").update(bytes).digest("hex");
  const [committed] = await database
    .select({ id: uploads.id })
    .from(uploads)
    .where(and(eq(uploads.studyId, study.id), eq(uploads.sha256, sha256), eq(uploads.status, "committed")))
    .limit(1);
  if (committed) return false;
  const analyte = await findAnalyteByCode(database, { code: spec.analyte });
  if (!analyte) throw new Error(`The demo study "${spec.title}" needs the analyte ${spec.analyte}.`);
  const checked = await checkUpload(bytes, {
    unit: analyte.unit,
    convertUnit: (value, from, to) => convertUnit({ value, from, to, molarMass: analyte.molarMass }),
    routine: study.kind === "indirect",
  });
  // As the upload route reads a file for an age-curve study: exact ages and measured values only.
  const report = study.kind === "age_curve" ? ageCurveReport(checked) : checked;
  if (report.rows.invalid > 0) {
    throw new Error(`The demo file ${spec.fileName} has problems: ${JSON.stringify(report.problems.slice(0, 3))}`);
  }
  const file = { name: spec.fileName, sha256, sizeBytes: bytes.byteLength };
  const upload = await createPendingUpload(database, { studyId: study.id, file, report, actor });
  await commitUpload(database, { studyId: study.id, uploadId: upload.id, actor });
  return true;
}

const donorCode = (spec: DemoStudy, donor: number) => `${spec.cohort!.codePrefix}-${String(donor).padStart(4, "0")}`;

const KEEP_REASON = "Reviewed against the sample log: no pre-analytical error, within what healthy donors show. Kept.";

/**
 * Screens with Horn's method and answers every proposal as the scientist would: the file's
 * gross errors are excluded (with the study's reason), the other proposals kept; then the
 * manual exclusion. Skipped when the study was screened already.
 */
async function ensureScreened(database: Database, spec: DemoStudy, study: Study, actor: Actor): Promise<boolean> {
  // A screen stores nothing but its audit event: that event says the study was screened.
  const [{ screened }] = await database
    .select({ screened: count() })
    .from(auditEvents)
    .where(and(eq(auditEvents.action, "study.screened"), eq(auditEvents.entityType, "study"), eq(auditEvents.entityId, study.id)));
  if (screened > 0) return false;
  const gross = new Set((spec.cohort!.grossErrors ?? []).map((g) => donorCode(spec, g.donor)));
  const screen = await screenStudy(database, { studyId: study.id, rule: "horn", actor });
  for (const proposal of screen.proposals) {
    const exclude = gross.has(proposal.donorCode);
    // As the outlier-decisions route does: the server's own screen gives the evidence kept with the decision.
    const { rule, evidence } = await screenEvidenceOf(database, { studyId: study.id, donorResultId: proposal.donorResultId, rule: "horn" });
    await createOutlierDecision(database, {
      studyId: study.id,
      donorResultId: proposal.donorResultId,
      decision: exclude ? "exclude" : "keep",
      rule,
      reason: exclude ? spec.outlierReason! : KEEP_REASON,
      evidence,
      actor,
    });
  }
  if (spec.manualExclusion) {
    const codes = spec.manualExclusion.donors.map((d) => donorCode(spec, d));
    const rows = await database
      .select({ id: donorResults.id })
      .from(donorResults)
      .where(and(eq(donorResults.studyId, study.id), inArray(donorResults.donorCode, codes)))
      .orderBy(asc(donorResults.id));
    await createExclusions(database, { studyId: study.id, donorResultIds: rows.map((r) => r.id), reason: spec.manualExclusion.reason, actor });
  }
  return true;
}

/** Runs the study's partition tests and stores the plan chosen from them, unless done. */
async function ensurePartitioned(database: Database, spec: DemoStudy, study: Study, actor: Actor): Promise<boolean> {
  let added = false;
  if (spec.assessment) {
    const [{ n }] = await database.select({ n: count() }).from(partitionAssessments).where(eq(partitionAssessments.studyId, study.id));
    if (n === 0) {
      await createPartitionAssessment(database, { studyId: study.id, input: spec.assessment, actor });
      added = true;
    }
  }
  if (spec.plan && !study.partitionPlan) {
    await setPartitionPlan(database, { id: study.id, plan: spec.plan, actor });
    added = true;
  }
  return added;
}

/**
 * One estimate per partition of the plan (Horn's screen listed, auto scale, seed 1), or for an
 * age-curve study one LMS fit of both sexes (seed 1), unless the study has estimates.
 */
async function ensureEstimated(database: Database, spec: DemoStudy, study: Study, actor: Actor): Promise<{ ids: string[]; added: boolean }> {
  const existing = await database.select({ id: estimates.id }).from(estimates).where(eq(estimates.studyId, study.id)).orderBy(asc(estimates.createdAt), asc(estimates.id));
  if (existing.length > 0) return { ids: existing.map((e) => e.id), added: false };
  if (spec.kind === "age_curve") {
    const fit = await createLmsEstimate(database, { studyId: study.id, input: { method: "lms", sex: null, seed: 1 }, actor });
    return { ids: [fit.id], added: true };
  }
  if (spec.kind === "indirect") {
    const estimate = await createIndirectEstimate(database, { studyId: study.id, input: spec.indirect!, actor });
    return { ids: [estimate.id], added: true };
  }
  const ids: string[] = [];
  for (const partition of partitionsOfPlan(spec.plan)) {
    const estimate = await createEstimate(database, { studyId: study.id, input: { partition, outliers: "horn", transform: "auto", seed: 1 }, actor });
    ids.push(estimate.id);
  }
  return { ids, added: true };
}

/** The draft interval version from the study's estimates with the chosen method, unless the study has a version. */
async function ensureDraft(
  database: Database,
  spec: DemoStudy,
  study: Study,
  estimateIds: string[],
  actor: Actor,
): Promise<{ id: string; state: string; added: boolean }> {
  const [existing] = await database
    .select({ id: intervalVersions.id, state: intervalVersions.state })
    .from(intervalVersions)
    .where(eq(intervalVersions.studyId, study.id))
    .limit(1);
  if (existing) return { ...existing, added: false };
  const version = await createIntervalVersion(database, {
    input: {
      analyte: spec.analyte,
      study: study.id,
      partitions: estimateIds.map((estimate) => ({ estimate, method: spec.chosenMethod })),
      note: spec.note,
    },
    actor,
  });
  return { id: version.id, state: version.state, added: true };
}

/** The demo's in-force versions were signed at 09:30 UTC on their effective day, submitted a week before. */
const signedAt = (spec: DemoStudy) => new Date(`${spec.effectiveFrom}T09:30:00Z`);
const WEEK_MS = 7 * 24 * 60 * 60 * 1000;

/** The session the demo's director signs in: its first signature gives the e-mail, later ones the password. */
const DEMO_SIGNING_SESSION = "demo-seed";

/**
 * Moves a demo version on through the same queries as the API: submitted by the demo scientist,
 * and for a version in force signed off by the demo director with the published demo password,
 * at the moment the demo's story puts it (so the signature, its hash and the superseding are
 * those of a real sign-off).
 */
async function advanceVersion(
  database: Database,
  { versionId, to, spec, actors, submitted = false }: { versionId: string; to: "awaiting_signoff" | "in_force"; spec: DemoStudy; actors: DemoActors; submitted?: boolean },
): Promise<void> {
  const at = to === "in_force" ? signedAt(spec) : new Date();
  const scientist = { id: actors.scientist.id!, email: actors.scientist.label, sessionId: null };
  if (!submitted) await submitIntervalVersion(database, { id: versionId, caller: scientist, at: to === "in_force" ? new Date(at.getTime() - WEEK_MS) : at });
  if (to !== "in_force") return;
  const account = DEMO_USERS.find((u) => u.role === "director")!;
  await signIntervalVersion(database, {
    id: versionId,
    credentials: { password: account.password, email: account.email },
    caller: { id: actors.director.id!, email: actors.director.label, sessionId: DEMO_SIGNING_SESSION },
    at,
  });
}

/** Seeds every demo study as far as its stage; returns whether it added anything. */
export async function seedDemoStudies(database: Database, actors: DemoActors): Promise<boolean> {
  let added = false;
  for (const spec of DEMO_STUDIES) {
    const { study, added: opened } = await ensureStudy(database, spec, actors.scientist);
    const uploaded = await ensureDonorResults(database, spec, study, actors.scientist);
    added ||= opened || uploaded;
    // An age-curve study has no screen or partitions: its curves take age in themselves; an
    // indirect study's cleaning and partition are part of its estimate.
    const direct = spec.kind !== "age_curve" && spec.kind !== "indirect";
    if (direct && reached(spec, "screened")) added = (await ensureScreened(database, spec, study, actors.scientist)) || added;
    if (direct && reached(spec, "partitioned")) added = (await ensurePartitioned(database, spec, study, actors.scientist)) || added;
    if (!reached(spec, "estimated")) continue;
    const estimated = await ensureEstimated(database, spec, study, actors.scientist);
    added ||= estimated.added;
    if (!reached(spec, "draft")) continue;
    const version = await ensureDraft(database, spec, study, estimated.ids, actors.scientist);
    added ||= version.added;
    const target = spec.stage === "in_force" || spec.stage === "awaiting_signoff" ? spec.stage : null;
    if (target && version.state === "draft") {
      await advanceVersion(database, { versionId: version.id, to: target, spec, actors });
      added = true;
    } else if (target === "in_force" && version.state === "awaiting_signoff") {
      // A seed stopped between submission and signature: sign now.
      await advanceVersion(database, { versionId: version.id, to: target, spec, actors, submitted: true });
      added = true;
    }
  }
  return added;
}
