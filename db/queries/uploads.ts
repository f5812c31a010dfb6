import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import type { DonorRow, ValidationReport } from "@/lib/uploads";
import type { Database, Executor } from "../client";
import { uniqueViolationOf } from "../errors";
import { donorResults, studies, uploads, type Study, type Upload } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";

/** Rows per multi-row INSERT when an upload is committed. */
export const COMMIT_BATCH_ROWS = 1_000;

export interface UploadedFile {
  name: string;
  sha256: string;
  sizeBytes: number;
}

function duplicateFile(fileName: string): AppError {
  return new AppError(
    "conflict",
    `The same file (${fileName}, by its SHA-256) is already committed in this study; it was not stored again.`,
  );
}

function studyClosed(): AppError {
  return new AppError("conflict", "The study is closed: it takes no more uploads.");
}

/** The checks an upload must pass before its file is even read: the study is open and the file is new to it. */
export async function assertStudyTakesFile(executor: Executor, { study, file }: { study: Study; file: UploadedFile }) {
  if (study.status !== "open") throw studyClosed();
  const [committed] = await executor
    .select({ id: uploads.id })
    .from(uploads)
    .where(and(eq(uploads.studyId, study.id), eq(uploads.sha256, file.sha256), eq(uploads.status, "committed")))
    .limit(1);
  if (committed) throw duplicateFile(file.name);
}

/**
 * Keeps a checked upload as pending: the report (without the rows) and the valid rows, in
 * PostgreSQL, so that any instance of the app can commit it. Stores no donor result.
 */
export async function createPendingUpload(
  database: Database,
  { studyId, file, report, actor }: { studyId: string; file: UploadedFile; report: ValidationReport; actor: Actor },
): Promise<Upload> {
  return database.transaction(async (tx) => {
    const [study] = await tx.select().from(studies).where(eq(studies.id, studyId)).for("update");
    if (!study) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
    await assertStudyTakesFile(tx, { study, file });
    const { validRows, ...rest } = report;
    const [created] = await tx
      .insert(uploads)
      .values({
        studyId,
        fileName: file.name,
        sha256: file.sha256,
        sizeBytes: file.sizeBytes,
        format: report.format,
        rowsTotal: report.rows.total,
        rowsValid: report.rows.valid,
        rowsInvalid: report.rows.invalid,
        report: rest as unknown as Record<string, unknown>,
        pendingRows: validRows,
        uploadedBy: actor.id,
      })
      .returning();
    await recordAuditEvent(tx, {
      actor,
      action: "upload.checked",
      entityType: "upload",
      entityId: created.id,
      summary: `Checked ${file.name} for the study "${study.title}": ${report.rows.valid} of ${report.rows.total} rows valid`,
      details: { studyId, fileName: file.name, sha256: file.sha256, sizeBytes: file.sizeBytes, rows: report.rows },
    });
    return created;
  });
}

/** A file refused whole is not kept, but the refusal is on the audit trail. */
export async function recordRefusedUpload(
  executor: Executor,
  { studyId, file, reason, actor }: { studyId: string; file: UploadedFile; reason: string; actor: Actor },
): Promise<void> {
  await recordAuditEvent(executor, {
    actor,
    action: "upload.refused",
    entityType: "study",
    entityId: studyId,
    summary: `Refused ${file.name}: ${reason}`,
    details: { fileName: file.name, sha256: file.sha256, sizeBytes: file.sizeBytes, reason },
  });
}

async function lockPendingUpload(executor: Executor, { studyId, uploadId }: { studyId: string; uploadId: string }) {
  const [upload] = await executor
    .select()
    .from(uploads)
    .where(and(eq(uploads.id, uploadId), eq(uploads.studyId, studyId)))
    .for("update");
  if (!upload) throw new AppError("not_found", `There is no upload with the id ${uploadId} in this study.`);
  if (upload.status !== "pending") throw new AppError("conflict", `The upload is ${upload.status}, not pending.`);
  return upload;
}

/**
 * Inserts donor rows in one multi-row statement: each column travels as one array parameter
 * and `unnest` turns them back into rows (14 parameters whatever the batch size).
 */
async function insertDonorRows(executor: Executor, { studyId, uploadId, rows }: { studyId: string; uploadId: string; rows: DonorRow[] }) {
  const column = <T>(pick: (row: DonorRow) => T) => sql.param(rows.map(pick));
  await executor.execute(sql`
    INSERT INTO ${donorResults} (study_id, upload_id, row_number, donor_code, sex, age_years, age_days, birth_date,
      collected_on, value, censoring_side, censoring_inclusive, original_value, original_unit)
    SELECT ${studyId}::uuid, ${uploadId}::uuid, r.row_number, r.donor_code, r.sex, r.age_years, r.age_days, r.birth_date,
      r.collected_on, r.value, r.censoring_side::censoring_side, r.censoring_inclusive, r.original_value, r.original_unit
    FROM unnest(
      ${column((r) => r.row)}::int[], ${column((r) => r.donorCode)}::text[], ${column((r) => r.sex)}::text[],
      ${column((r) => r.ageYears)}::float8[], ${column((r) => r.ageDays)}::int[], ${column((r) => r.birthDate)}::text[],
      ${column((r) => r.collectedOn)}::text[], ${column((r) => r.value)}::float8[],
      ${column((r) => r.censoring?.side ?? null)}::text[], ${column((r) => r.censoring?.inclusive ?? null)}::bool[],
      ${column((r) => r.conversion?.value ?? null)}::float8[], ${column((r) => r.conversion?.fromUnit ?? null)}::text[]
    ) AS r(row_number, donor_code, sex, age_years, age_days, birth_date, collected_on, value, censoring_side,
      censoring_inclusive, original_value, original_unit)`);
}

/**
 * Stores the pending upload's valid rows as donor results and marks it committed, in one
 * transaction: either every row is stored or none. 409 when the upload is not pending, the
 * study is closed, or the same file was committed meanwhile.
 */
export async function commitUpload(
  database: Database,
  { studyId, uploadId, actor }: { studyId: string; uploadId: string; actor: Actor },
): Promise<{ status: "committed"; stored: number }> {
  try {
    return await commitPendingRows(database, { studyId, uploadId, actor });
  } catch (err) {
    // The same file committed at the same moment through another upload: the partial unique index decides.
    if (uniqueViolationOf(err) !== null) throw new AppError("conflict", "The same file (by its SHA-256) is already committed in this study.");
    throw err;
  }
}


async function commitPendingRows(
  database: Database,
  { studyId, uploadId, actor }: { studyId: string; uploadId: string; actor: Actor },
): Promise<{ status: "committed"; stored: number }> {
  return database.transaction(async (tx) => {
    const [study] = await tx.select().from(studies).where(eq(studies.id, studyId)).for("update");
    if (!study) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
    const upload = await lockPendingUpload(tx, { studyId, uploadId });
    await assertStudyTakesFile(tx, { study, file: { name: upload.fileName, sha256: upload.sha256, sizeBytes: upload.sizeBytes } });
    const rows = (upload.pendingRows ?? []) as DonorRow[];
    for (let start = 0; start < rows.length; start += COMMIT_BATCH_ROWS) {
      await insertDonorRows(tx, { studyId, uploadId, rows: rows.slice(start, start + COMMIT_BATCH_ROWS) });
    }
    await tx
      .update(uploads)
      .set({ status: "committed", pendingRows: null, storedRows: rows.length, decidedBy: actor.id, decidedAt: new Date() })
      .where(eq(uploads.id, uploadId));
    await recordAuditEvent(tx, {
      actor,
      action: "upload.committed",
      entityType: "upload",
      entityId: uploadId,
      summary: `Stored ${rows.length} donor results from ${upload.fileName} in the study "${study.title}"`,
      details: { studyId, stored: rows.length, sha256: upload.sha256 },
    });
    return { status: "committed" as const, stored: rows.length };
  });
}

/** Discards a pending upload's rows; the upload record stays, cancelled. */
export async function cancelUpload(
  database: Database,
  { studyId, uploadId, actor }: { studyId: string; uploadId: string; actor: Actor },
): Promise<{ status: "cancelled" }> {
  return database.transaction(async (tx) => {
    const upload = await lockPendingUpload(tx, { studyId, uploadId });
    await tx
      .update(uploads)
      .set({ status: "cancelled", pendingRows: null, decidedBy: actor.id, decidedAt: new Date() })
      .where(eq(uploads.id, uploadId));
    await recordAuditEvent(tx, {
      actor,
      action: "upload.cancelled",
      entityType: "upload",
      entityId: uploadId,
      summary: `Cancelled the upload of ${upload.fileName}`,
      details: { studyId, rows: { total: upload.rowsTotal, valid: upload.rowsValid, invalid: upload.rowsInvalid } },
    });
    return { status: "cancelled" as const };
  });
}
