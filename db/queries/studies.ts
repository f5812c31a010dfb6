import "server-only";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import type { NewStudyInput } from "@/lib/studies/input";
import type { Database, Executor } from "../client";
import { analytes, donorResults, exclusions, studies, uploads, users, type Study } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";

export type { Study };

export interface StudySummary extends Study {
  analyteCode: string;
  uploadCount: number;
  /** Uploads whose rows are stored (not pending, not cancelled). */
  committedUploadCount: number;
  donorResultCount: number;
}

/** Creates a study for the analyte with the given code; 422 when no such analyte exists. */
export async function createStudy(database: Database, { input, actor }: { input: NewStudyInput; actor: Actor }): Promise<Study> {
  return database.transaction(async (tx) => {
    const [analyte] = await tx.select().from(analytes).where(eq(analytes.code, input.analyte)).limit(1);
    if (!analyte) {
      const message = `There is no analyte with the code ${input.analyte}.`;
      throw new AppError("invalid", message, { errors: [{ path: "analyte", message }] });
    }
    const [created] = await tx
      .insert(studies)
      .values({
        analyteId: analyte.id,
        title: input.title,
        kind: input.kind,
        method: input.method ?? null,
        specimen: input.specimen ?? analyte.specimen,
        criteria: input.criteria ?? null,
        collectedFrom: input.collectedFrom ?? null,
        collectedTo: input.collectedTo ?? null,
        createdBy: actor.id,
      })
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "study.created",
      entityType: "study",
      entityId: created.id,
      summary: `Opened the ${created.kind === "age_curve" ? "age-curve " : created.kind === "indirect" ? "indirect " : ""}study "${created.title}" for ${analyte.code}`,
      details: { analyte: analyte.code, title: created.title, kind: created.kind, method: created.method, specimen: created.specimen },
    });
    return created;
  });
}

const uploadCount = sql<number>`(SELECT count(*)::int FROM ${uploads} WHERE ${uploads.studyId} = ${studies.id})`;
const committedUploadCount = sql<number>`(SELECT count(*)::int FROM ${uploads} WHERE ${uploads.studyId} = ${studies.id} AND ${uploads.status} = 'committed')`;
const donorResultCount = sql<number>`(SELECT count(*)::int FROM ${donorResults} WHERE ${donorResults.studyId} = ${studies.id})`;

/** Every study, newest first, with its analyte's code and counts. */
export async function listStudies(executor: Executor): Promise<StudySummary[]> {
  const rows = await executor
    .select({ study: studies, analyteCode: analytes.code, uploadCount, committedUploadCount, donorResultCount })
    .from(studies)
    .innerJoin(analytes, eq(analytes.id, studies.analyteId))
    .orderBy(desc(studies.createdAt), desc(studies.id));
  return rows.map((r) => ({
    ...r.study,
    analyteCode: r.analyteCode,
    uploadCount: r.uploadCount,
    committedUploadCount: r.committedUploadCount,
    donorResultCount: r.donorResultCount,
  }));
}

export async function findStudy(executor: Executor, { id }: { id: string }): Promise<Study | undefined> {
  const [row] = await executor.select().from(studies).where(eq(studies.id, id)).limit(1);
  return row;
}

/** The study with its analyte, its uploads (without their rows) and the number of donor results. */
export async function studyDetail(executor: Executor, { id }: { id: string }) {
  const [row] = await executor
    .select({ study: studies, analyte: analytes, donorResultCount })
    .from(studies)
    .innerJoin(analytes, eq(analytes.id, studies.analyteId))
    .where(eq(studies.id, id))
    .limit(1);
  if (!row) throw new AppError("not_found", `There is no study with the id ${id}.`);
  const uploadRows = await executor
    .select({
      id: uploads.id,
      fileName: uploads.fileName,
      sha256: uploads.sha256,
      sizeBytes: uploads.sizeBytes,
      format: uploads.format,
      status: uploads.status,
      rowsTotal: uploads.rowsTotal,
      rowsValid: uploads.rowsValid,
      rowsInvalid: uploads.rowsInvalid,
      storedRows: uploads.storedRows,
      uploadedBy: uploads.uploadedBy,
      uploadedAt: uploads.uploadedAt,
      decidedAt: uploads.decidedAt,
    })
    .from(uploads)
    .where(eq(uploads.studyId, id))
    .orderBy(desc(uploads.uploadedAt), desc(uploads.id));
  return {
    ...row.study,
    analyteCode: row.analyte.code,
    analyte: row.analyte,
    uploads: uploadRows.map((u) => ({ ...u, rows: { total: u.rowsTotal, valid: u.rowsValid, invalid: u.rowsInvalid } })),
    donorResultCount: row.donorResultCount,
  };
}

/**
 * Locks the study against closing (FOR SHARE: writes to other tables may run side by side) and
 * checks that it is open: 404 when unknown, 409 "The study is closed: …" otherwise. Call it first
 * inside the transaction of every write to a study's screening and partitions.
 */
export async function lockOpenStudy(executor: Executor, { id, refusal }: { id: string; refusal: string }): Promise<Study> {
  const [study] = await executor.select().from(studies).where(eq(studies.id, id)).for("share");
  if (!study) throw new AppError("not_found", `There is no study with the id ${id}.`);
  if (study.status === "closed") throw new AppError("conflict", `The study is closed: ${refusal}`);
  return study;
}

/** Stores the partitions the scientist chose for an open study, audited. */
export async function setPartitionPlan(
  database: Database,
  { id, plan, actor }: { id: string; plan: NonNullable<Study["partitionPlan"]>; actor: Actor },
): Promise<Study> {
  return database.transaction(async (tx) => {
    const [study] = await tx.select().from(studies).where(eq(studies.id, id)).for("update");
    if (!study) throw new AppError("not_found", `There is no study with the id ${id}.`);
    if (study.status === "closed") throw new AppError("conflict", "The study is closed: its partitions can no longer change.");
    const [updated] = await tx.update(studies).set({ partitionPlan: plan }).where(eq(studies.id, id)).returning();
    await recordAuditEvent(tx, {
      actor,
      action: "study.partition-plan-set",
      entityType: "study",
      entityId: id,
      summary: `Chose the partitions of the study "${study.title}": ${describePlan(plan)}`,
      details: { before: study.partitionPlan, after: plan },
    });
    return updated;
  });
}

function describePlan(plan: NonNullable<Study["partitionPlan"]>): string {
  const parts: string[] = [];
  if (plan.sex) parts.push("by sex");
  if (plan.ageBands) parts.push(`by age ${plan.ageBands.map(([a, b]) => `[${a}, ${b})`).join(", ")}`);
  return parts.length > 0 ? parts.join(" and ") : "one partition of everyone";
}

/** How many of the study's donor results have an exclusion in effect (not undone). */
export async function countActiveExclusions(executor: Executor, { studyId }: { studyId: string }): Promise<number> {
  const [row] = await executor
    .select({ n: sql<number>`count(*)::int` })
    .from(exclusions)
    .where(and(eq(exclusions.studyId, studyId), isNull(exclusions.undoneAt)));
  return row.n;
}

/** Who closed a study, by name, for the page that says it is closed. */
export async function studyCloser(executor: Executor, { study }: { study: Study }): Promise<{ id: string; name: string } | null> {
  if (!study.closedBy) return null;
  const [row] = await executor.select({ id: users.id, name: users.name }).from(users).where(eq(users.id, study.closedBy)).limit(1);
  return row ?? null;
}

export interface ClosedStudy {
  id: string;
  status: "closed";
  closedAt: Date;
  closedBy: { id: string; name: string } | null;
  /** Uploads that were still pending, cancelled with the study. */
  cancelledUploads: { id: string; fileName: string }[];
}

/**
 * Closes an open study: it takes no more uploads, exclusions or estimates. Pending uploads are
 * cancelled in the same transaction, each on the audit trail with the closing. 404 for an
 * unknown study, 409 when it is already closed.
 */
export async function closeStudy(database: Database, { id, actor }: { id: string; actor: Actor }): Promise<ClosedStudy> {
  return database.transaction(async (tx) => {
    const [study] = await tx.select().from(studies).where(eq(studies.id, id)).for("update");
    if (!study) throw new AppError("not_found", `There is no study with the id ${id}.`);
    if (study.status === "closed") {
      const when = study.closedAt ? ` on ${study.closedAt.toISOString().slice(0, 10)}` : "";
      throw new AppError("conflict", `The study is closed: it was closed${when} and cannot be closed again.`);
    }
    const now = new Date();
    const cancelled = await tx
      .update(uploads)
      .set({ status: "cancelled", pendingRows: null, decidedBy: actor.id, decidedAt: now })
      .where(and(eq(uploads.studyId, id), eq(uploads.status, "pending")))
      .returning({ id: uploads.id, fileName: uploads.fileName });
    for (const upload of cancelled) {
      await recordAuditEvent(tx, {
        actor,
        action: "upload.cancelled",
        entityType: "upload",
        entityId: upload.id,
        summary: `Cancelled the upload of ${upload.fileName}: the study "${study.title}" was closed`,
        details: { studyId: id, reason: "study closed" },
      });
    }
    const [closed] = await tx
      .update(studies)
      .set({ status: "closed", closedAt: now, closedBy: actor.id })
      .where(eq(studies.id, id))
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "study.closed",
      entityType: "study",
      entityId: id,
      summary: `Closed the study "${study.title}"`,
      details: { cancelledUploads: cancelled.map((u) => u.id) },
    });
    const closedBy = await studyCloser(tx, { study: closed });
    return { id, status: "closed" as const, closedAt: closed.closedAt!, closedBy, cancelledUploads: cancelled };
  });
}
