import "server-only";
import { and, asc, eq, isNull, sql, type SQL } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import { engineIdentity } from "@/lib/engine";
import { StatsInputError } from "@/lib/stats/validate";
import { lmsZAt } from "@/lib/stats/lms-model";
import {
  centileCurves,
  lmsEstimateDocument,
  LMS_CHART_DONORS,
  thinIndices,
  type LmsCurvePoint,
  type LmsEstimateDocument,
  type LmsEstimateInput,
} from "@/lib/studies/age-curves";
import { partitionOut, type PartitionOut } from "@/lib/studies/estimate-input";
import type { Database, Executor } from "../client";
import { donorResults, estimates, exclusions, studies, type Estimate, type Study } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";
import { listIncludedDonorValues } from "./donor-results";
import { committedUploadHashes, storedInputConditions } from "./estimates";

/** Whether an estimate row holds LMS age curves (its options say so). */
export function isLmsEstimate(row: Pick<Estimate, "options">): boolean {
  return (row.options as { method?: unknown }).method === "lms";
}

/** 409 unless the study is an age-curve study; `what` names the step. */
export function assertAgeCurveStudy(study: Pick<Study, "kind" | "title">, what: string): void {
  if (study.kind !== "age_curve") {
    const holds = study.kind === "indirect" ? "estimates limits indirectly from routine results" : "estimates limits per partition";
    throw new AppError("conflict", `The study "${study.title}" ${holds}, not age curves: ${what} is for age-curve studies.`);
  }
}

/** 409 for a step of direct studies asked of an age-curve or indirect study; `what` names the step. */
export function assertDirectStudy(study: Pick<Study, "kind" | "title">, what: string): void {
  if (study.kind === "age_curve") {
    throw new AppError(
      "conflict",
      `The study "${study.title}" is an age-curve study: ${what} does not apply to it. Fit the LMS curves instead (POST …/estimates with {"method": "lms"}).`,
    );
  }
  if (study.kind === "indirect") {
    throw new AppError(
      "conflict",
      `The study "${study.title}" is an indirect study of routine results: ${what} does not apply to it. Estimate indirectly instead (POST …/estimates with {"method": "indirect"}).`,
    );
  }
}

/** The API's answer: the document plus who and what it is, as direct estimates are answered. */
export type LmsEstimateOut = LmsEstimateDocument & { id: string; studyId: string; partition: PartitionOut; createdAt: Date };

export function lmsEstimateOut(row: Estimate): LmsEstimateOut {
  return { id: row.id, studyId: row.studyId, partition: partitionOut(row), createdAt: row.createdAt, ...(row.document as unknown as LmsEstimateDocument) };
}

/**
 * Fits LMS curves to an age-curve study's donors of one sex (or both) without an exclusion in
 * effect, in one repeatable-read snapshot, and stores the document as an `estimates` row with the
 * exclusions in effect and the committed uploads' SHA-256, audited. 404 for an unknown study, 409
 * for a closed or direct study, 422 when the donors cannot be fitted (the engine's reason).
 */
export async function createLmsEstimate(
  database: Database,
  { studyId, input, actor }: { studyId: string; input: LmsEstimateInput; actor: Actor },
): Promise<LmsEstimateOut> {
  return database.transaction(async (tx) => {
    const [study] = await tx.select().from(studies).where(eq(studies.id, studyId));
    if (!study) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
    assertAgeCurveStudy(study, "an LMS fit");
    if (study.status !== "open") throw new AppError("conflict", "The study is closed: it takes no more estimates.");
    const partition = input.sex ? { sex: input.sex } : {};
    const rows = await listIncludedDonorValues(tx, { studyId, partition });
    const measured = rows.filter((r) => r.censoringSide === null);
    const notes: string[] = [];
    const censored = rows.length - measured.length;
    if (censored > 0) notes.push(`${censored} censored result${censored === 1 ? " was" : "s were"} left out: the curves take measured values only`);
    const excludedRows = await tx
      .select({ id: exclusions.id })
      .from(exclusions)
      .innerJoin(donorResults, eq(donorResults.id, exclusions.donorResultId))
      .where(and(eq(exclusions.studyId, studyId), isNull(exclusions.undoneAt), ...(input.sex ? [eq(donorResults.sex, input.sex)] : [])))
      .orderBy(asc(exclusions.createdAt), asc(exclusions.id));
    const who = input.sex === "F" ? "women and girls" : input.sex === "M" ? "men and boys" : "both sexes";
    let document: LmsEstimateDocument;
    try {
      document = lmsEstimateDocument({
        ages: measured.map((r) => r.ageYears),
        values: measured.map((r) => r.value),
        sexes: measured.map((r) => r.sex),
        input,
        excluded: excludedRows.length,
        notes,
      });
    } catch (err) {
      if (err instanceof StatsInputError) {
        throw new AppError("invalid", `The donors (${who}, ${measured.length} without an exclusion in effect) cannot be fitted: ${err.message}.`);
      }
      throw err;
    }
    document.provenance.engine = engineIdentity();
    const uploadHashes = await committedUploadHashes(tx, studyId);
    const [row] = await tx
      .insert(estimates)
      .values({
        studyId,
        sex: input.sex,
        ageFrom: null,
        ageTo: null,
        options: { method: "lms", sex: input.sex, seed: input.seed },
        seed: input.seed,
        n: document.n,
        document: JSON.parse(JSON.stringify(document)) as Record<string, unknown>,
        exclusionIds: excludedRows.map((e) => e.id),
        uploadHashes,
        createdBy: actor.id,
      })
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "estimate.created",
      entityType: "estimate",
      entityId: row.id,
      summary: `Fitted LMS age curves (${who}) in the study "${study.title}" (n = ${document.n})`,
      details: {
        studyId,
        method: "lms",
        sex: input.sex,
        seed: input.seed,
        n: document.n,
        edf: document.edf,
        ageRange: document.ageRange,
        exclusionIds: row.exclusionIds,
        uploadHashes,
        engine: document.provenance.engine,
      },
    });
    return lmsEstimateOut(row);
  }, { isolationLevel: "repeatable read" });
}

/** A donor result behind an LMS estimate, with its z against the curves. */
export interface AgeCurveDonor {
  id: number;
  donorCode: string;
  sex: string;
  age: number;
  value: number;
  z: number;
}

/**
 * The donors an LMS estimate was fitted to, read again from what it stored: its sex, the uploads
 * it names, less the exclusions it names and censored results, in donor_results.id order.
 */
export async function donorsOfLmsEstimate(executor: Executor, { estimate }: { estimate: Estimate }): Promise<Omit<AgeCurveDonor, "z">[]> {
  if (estimate.uploadHashes.length === 0) return [];
  const parts: SQL[] = [eq(donorResults.studyId, estimate.studyId), isNull(donorResults.censoringSide)];
  if (estimate.sex) parts.push(eq(donorResults.sex, estimate.sex));
  parts.push(...storedInputConditions(executor, { estimate }));
  return executor
    .select({ id: donorResults.id, donorCode: donorResults.donorCode, sex: donorResults.sex, age: donorResults.ageYears, value: donorResults.value })
    .from(donorResults)
    .where(and(...parts))
    .orderBy(asc(donorResults.id));
}

export interface AgeCurveChartData {
  estimateId: string;
  sex: "F" | "M" | null;
  n: number;
  unit: string;
  ageRange: { min: number; max: number };
  curves: LmsCurvePoint[];
  donors: { points: AgeCurveDonor[]; thinned: boolean };
  /** Donors more than 4 SD from the median curve, all of them (for the exclusion of outliers by hand). */
  far: AgeCurveDonor[];
  diagnostics: LmsEstimateDocument["diagnostics"];
  warnings: string[];
  advice: string[];
}

/**
 * The chart and diagnostics of an LMS estimate: the 2.5th, 50th and 97.5th centile curves, the
 * donors as points (at most LMS_CHART_DONORS, evenly by age; all donors beyond 4 SD listed),
 * the coverage and Q-Q by age group. 404 for an unknown estimate, 409 for a direct one.
 */
export async function ageCurveChartData(executor: Executor, { studyId, estimateId }: { studyId: string; estimateId: string }): Promise<AgeCurveChartData> {
  const [row] = await executor
    .select({ estimate: estimates, unit: sql<string>`(SELECT a.unit FROM analytes a JOIN studies s ON s.analyte_id = a.id WHERE s.id = ${estimates.studyId})` })
    .from(estimates)
    .where(and(eq(estimates.id, estimateId), eq(estimates.studyId, studyId)))
    .limit(1);
  if (!row) throw new AppError("not_found", `There is no estimate with the id ${estimateId} in this study.`);
  const { estimate } = row;
  if (!isLmsEstimate(estimate)) {
    throw new AppError("conflict", "This estimate holds limits, not age curves: its charts are at …/chart-data.");
  }
  const document = estimate.document as unknown as LmsEstimateDocument;
  const donors = await donorsOfLmsEstimate(executor, { estimate });
  const withZ: AgeCurveDonor[] = donors.map((d) => ({ ...d, z: lmsZAt(document.model, d.age, d.value) }));
  const byAge = [...withZ].sort((a, b) => a.age - b.age || a.id - b.id);
  const points = thinIndices(byAge.length, LMS_CHART_DONORS).map((i) => byAge[i]);
  return {
    estimateId: estimate.id,
    sex: estimate.sex as "F" | "M" | null,
    n: estimate.n,
    unit: row.unit,
    ageRange: document.ageRange,
    curves: centileCurves(document.model),
    donors: { points, thinned: points.length < byAge.length },
    far: withZ.filter((d) => Math.abs(d.z) > 4),
    diagnostics: document.diagnostics,
    warnings: document.warnings,
    advice: document.advice,
  };
}

/**
 * For the steps of direct studies (screen, outlier decisions, partition assessment and plan):
 * 404 for an unknown study, 409 for an age-curve study, whose curves take age in themselves.
 */
export async function requireDirectStudy(executor: Executor, { id, what }: { id: string; what: string }): Promise<Study> {
  const [study] = await executor.select().from(studies).where(eq(studies.id, id)).limit(1);
  if (!study) throw new AppError("not_found", `There is no study with the id ${id}.`);
  assertDirectStudy(study, what);
  return study;
}
