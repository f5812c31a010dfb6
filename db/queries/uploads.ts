import "server-only";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { and, eq, getTableColumns } from "drizzle-orm";
import type { PoolClient } from "pg";
import { from as copyFrom } from "pg-copy-streams";
import { AppError } from "@/lib/api/errors";
import type { CensoringSide, DonorRow, ValidationReport } from "@/lib/uploads";
import { transactionWithClient, type Database, type Executor } from "../client";
import { uniqueViolationOf } from "../errors";
import { studies, uploads, type Study, type Upload } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";

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
        pendingRows: validRows.map(pendingRowOf),
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

/** Every column of an upload but its pending rows, which a commit reads on their own and a cancel never needs. */
const UPLOAD_COLUMNS = getTableColumns(uploads);
const LOCKED_UPLOAD_COLUMNS = Object.fromEntries(
  Object.entries(UPLOAD_COLUMNS).filter(([name]) => name !== "pendingRows"),
) as Omit<typeof UPLOAD_COLUMNS, "pendingRows">;

async function lockPendingUpload(executor: Executor, { studyId, uploadId }: { studyId: string; uploadId: string }) {
  const [upload] = await executor
    .select(LOCKED_UPLOAD_COLUMNS)
    .from(uploads)
    .where(and(eq(uploads.id, uploadId), eq(uploads.studyId, studyId)))
    .for("update");
  if (!upload) throw new AppError("not_found", `There is no upload with the id ${uploadId} in this study.`);
  if (upload.status !== "pending") throw new AppError("conflict", `The upload is ${upload.status}, not pending.`);
  return upload;
}

/**
 * A valid row as uploads.pending_rows keeps it: a tuple in the order of {@link DONOR_RESULT_COLUMNS},
 * about a third of the row object's size as JSON, so that keeping and reading 200,000 of them is
 * quick.
 */
type PendingRow = [
  rowNumber: number,
  donorCode: string,
  sex: DonorRow["sex"],
  ageYears: number,
  ageDays: number,
  birthDate: string | null,
  collectedOn: string | null,
  value: number,
  censoringSide: CensoringSide | null,
  censoringInclusive: boolean | null,
  originalValue: number | null,
  originalUnit: string | null,
  collectedAt?: string | null,
  setting?: string | null,
  /** The flags as JSON text (the column is jsonb). */
  flags?: string | null,
];

/** donor_results' columns that a commit fills from a pending row, in the tuple's order (study_id and upload_id come first). */
const DONOR_RESULT_COLUMNS = [
  "row_number", "donor_code", "sex", "age_years", "age_days", "birth_date", "collected_on", "value",
  "censoring_side", "censoring_inclusive", "original_value", "original_unit", "collected_at", "setting", "flags",
] as const;

function pendingRowOf(r: DonorRow): PendingRow {
  return [
    r.row, r.donorCode, r.sex, r.ageYears, r.ageDays, r.birthDate, r.collectedOn, r.value,
    r.censoring?.side ?? null, r.censoring?.inclusive ?? null, r.conversion?.value ?? null, r.conversion?.fromUnit ?? null,
    r.collectedAt ?? null, r.setting ?? null, r.flags ? JSON.stringify(r.flags) : null,
  ];
}

/** Rows per chunk of COPY data handed to the connection. */
const COPY_CHUNK_ROWS = 2_000;

const COPY_ESCAPES: Record<string, string> = { "\\": "\\\\", "\t": "\\t", "\n": "\\n", "\r": "\\r" };

/** One field in COPY's text format: \N for null, backslash, tab and line ends escaped. */
function copyField(value: string | number | boolean | null): string {
  if (value === null) return "\\N";
  if (typeof value === "string") return value.replace(/[\\\t\n\r]/g, (c) => COPY_ESCAPES[c]);
  return String(value);
}

/** The rows as COPY text, a few thousand lines per chunk. */
function* copyChunks(prefix: string, rows: readonly PendingRow[]): Generator<string> {
  for (let start = 0; start < rows.length; start += COPY_CHUNK_ROWS) {
    let chunk = "";
    for (const row of rows.slice(start, start + COPY_CHUNK_ROWS)) {
      chunk += prefix;
      // Tuples kept before the routine columns existed are shorter: the rest are null.
      for (let i = 0; i < DONOR_RESULT_COLUMNS.length; i++) chunk += (i === 0 ? "" : "\t") + copyField(row[i] ?? null);
      chunk += "\n";
    }
    yield chunk;
  }
}

/** Streams the rows into donor_results with COPY … FROM STDIN on the transaction's connection. */
async function copyDonorRows(client: PoolClient, { studyId, uploadId, rows }: { studyId: string; uploadId: string; rows: readonly PendingRow[] }): Promise<number> {
  const columns = ["study_id", "upload_id", ...DONOR_RESULT_COLUMNS].join(", ");
  const copy = client.query(copyFrom(`COPY donor_results (${columns}) FROM STDIN`));
  await pipeline(Readable.from(copyChunks(`${studyId}\t${uploadId}\t`, rows)), copy);
  return copy.rowCount;
}

/** How long each step of a commit took, in milliseconds (for the benchmark). */
export type CommitStep = "lock" | "read" | "copy" | "finish" | "commit";

/**
 * Stores the pending upload's valid rows as donor results (PostgreSQL COPY) and marks it
 * committed, in one transaction with its audit event: either every row is stored or none. 409
 * when the upload is not pending, the study is closed, or the same file was committed meanwhile.
 */
export async function commitUpload(
  database: Database,
  { studyId, uploadId, actor, onStep }: { studyId: string; uploadId: string; actor: Actor; onStep?: (step: CommitStep, ms: number) => void },
): Promise<{ status: "committed"; stored: number }> {
  let mark = performance.now();
  const step = (name: CommitStep) => {
    const now = performance.now();
    onStep?.(name, now - mark);
    mark = now;
  };
  try {
    const result = await transactionWithClient(database, (tx, client) => commitPendingRows(tx, client, { studyId, uploadId, actor, step }));
    step("commit");
    return result;
  } catch (err) {
    // The same file committed at the same moment through another upload: the partial unique index decides.
    if (uniqueViolationOf(err) !== null) throw new AppError("conflict", "The same file (by its SHA-256) is already committed in this study.");
    throw err;
  }
}


async function commitPendingRows(
  tx: Executor,
  client: PoolClient,
  { studyId, uploadId, actor, step }: { studyId: string; uploadId: string; actor: Actor; step: (name: CommitStep) => void },
): Promise<{ status: "committed"; stored: number }> {
  const [study] = await tx.select().from(studies).where(eq(studies.id, studyId)).for("update");
  if (!study) throw new AppError("not_found", `There is no study with the id ${studyId}.`);
  const upload = await lockPendingUpload(tx, { studyId, uploadId });
  await assertStudyTakesFile(tx, { study, file: { name: upload.fileName, sha256: upload.sha256, sizeBytes: upload.sizeBytes } });
  step("lock");
  // Read apart from the lock, through the driver's own JSON parsing: the rows are the one large field.
  const { rows: [pending] } = await client.query<{ rows: (PendingRow | DonorRow)[] | null }>(
    "SELECT pending_rows AS rows FROM uploads WHERE id = $1",
    [uploadId],
  );
  // An upload kept pending before rows were kept as tuples holds row objects.
  const rows = (pending.rows ?? []).map((r) => (Array.isArray(r) ? r : pendingRowOf(r)));
  step("read");
  const stored = await copyDonorRows(client, { studyId, uploadId, rows });
  step("copy");
  await tx
    .update(uploads)
    .set({ status: "committed", pendingRows: null, storedRows: stored, decidedBy: actor.id, decidedAt: new Date() })
    .where(eq(uploads.id, uploadId));
  await recordAuditEvent(tx, {
    actor,
    action: "upload.committed",
    entityType: "upload",
    entityId: uploadId,
    summary: `Stored ${stored} ${study.kind === "indirect" ? "routine" : "donor"} results from ${upload.fileName} in the study "${study.title}"`,
    details: { studyId, stored, sha256: upload.sha256 },
  });
  step("finish");
  return { status: "committed" as const, stored };
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
