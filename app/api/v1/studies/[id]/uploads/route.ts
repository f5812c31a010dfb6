import { createHash } from "node:crypto";
import { db } from "@/db/client";
import { findAnalyteById, type Analyte } from "@/db/queries/analytes";
import { findStudy, type Study } from "@/db/queries/studies";
import { assertStudyTakesFile, createPendingUpload, recordRefusedUpload, type UploadedFile } from "@/db/queries/uploads";
import type { Actor } from "@/db/queries/audit";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { toProblem } from "@/lib/api/problem";
import { actorOf } from "@/lib/auth/session";
import { ageCurveReport, missingDateColumns, missingDateColumnsMessage } from "@/lib/studies/age-curve-rows";
import { studyIdParams } from "@/lib/studies/input";
import { readUploadForm, UPLOAD_MULTIPART, uploadRefusal, type UploadForm } from "@/lib/studies/upload-form";
import { convertUnit } from "@/lib/units/ucum";
import { checkUpload, UploadError, type UploadProgress } from "@/lib/uploads";

export const dynamic = "force-dynamic";

interface CheckedFile {
  studyId: string;
  kind: Study["kind"];
  analyte: Analyte;
  options: UploadForm;
  bytes: Uint8Array;
  info: UploadedFile;
  actor: Actor;
}

/**
 * Checks the file against the study's analyte and keeps it pending; answers the upload as the
 * JSON body says. A file refused whole is on the audit trail and answered 413/415/422.
 */
async function checkAndKeep({ studyId, kind, analyte, options, bytes, info, actor }: CheckedFile, onProgress?: (p: UploadProgress) => void) {
  let report;
  try {
    report = await checkUpload(bytes, {
      unit: analyte.unit,
      mapping: options.mapping,
      decimalComma: options.decimalComma,
      sheet: options.sheet,
      convertUnit: (value, from, to) => convertUnit({ value, from, to, molarMass: analyte.molarMass }),
      onProgress,
      routine: kind === "indirect",
    });
  } catch (err) {
    if (!(err instanceof UploadError)) throw err;
    await recordRefusedUpload(db(), { studyId, file: info, reason: err.message, actor });
    throw uploadRefusal(err);
  }
  if (kind === "age_curve") {
    const missing = missingDateColumns(report);
    if (missing.length > 0) {
      const reason = missingDateColumnsMessage(missing);
      await recordRefusedUpload(db(), { studyId, file: info, reason, actor });
      throw new AppError("invalid", reason, { uploadError: "exact_ages_required", missing });
    }
    report = ageCurveReport(report);
  }
  const upload = await createPendingUpload(db(), { studyId, file: info, report, actor });
  return {
    id: upload.id,
    status: "pending" as const,
    rows: report.rows,
    problems: report.problems,
    problemsOmitted: report.problemsOmitted,
    fileName: upload.fileName,
    sha256: upload.sha256,
    sizeBytes: upload.sizeBytes,
    format: report.format,
    sheet: report.sheet,
    headers: report.headers,
    mapping: report.mapping,
  };
}

/** Whether the caller asked for the checking's progress as newline-delimited JSON. */
function wantsProgress(request: Request): boolean {
  return (request.headers.get("accept") ?? "").toLowerCase().includes("application/x-ndjson");
}

/**
 * The progress variant: `{"checked", "bytesRead", "totalBytes"}` lines while the rows are
 * checked (every 2,048 rows), then one line with the outcome: `{"status": 201, "upload": …}` or
 * `{"status": 4xx, "problem": …}`. Refusals found before checking starts (role, unknown study,
 * closed study, size, media type) are plain problem+json answers, as without the header.
 */
function progressStream(file: CheckedFile, instance: string): Response {
  const encoder = new TextEncoder();
  const stream = new ReadableStream<Uint8Array>({
    async start(controller) {
      const line = (value: unknown) => controller.enqueue(encoder.encode(`${JSON.stringify(value)}\n`));
      try {
        const upload = await checkAndKeep(file, (p) => line({ checked: p.rowsChecked, bytesRead: p.bytesRead, totalBytes: p.totalBytes }));
        line({ status: 201, upload });
      } catch (err) {
        const problem = toProblem(err, instance);
        line({ status: problem.status, problem });
      } finally {
        controller.close();
      }
    },
  });
  return new Response(stream, { status: 200, headers: { "content-type": "application/x-ndjson", "cache-control": "no-store" } });
}

/**
 * Checks a file of healthy-donor results (an indirect study: routine results, lib/uploads'
 * ROUTINE_COLUMNS) against the study's analyte and keeps it pending: the
 * validation report comes back, no donor result is stored until the upload is committed. With
 * `Accept: application/x-ndjson` the checking's progress comes first (see progressStream).
 */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, multipart: UPLOAD_MULTIPART },
  async ({ caller, params: { id }, form, request }) => {
    const study = await findStudy(db(), { id });
    if (!study) throw new AppError("not_found", `There is no study with the id ${id}.`);
    const analyte = await findAnalyteById(db(), { id: study.analyteId });
    if (!analyte) throw new AppError("not_found", `The study's analyte no longer exists.`);
    const options = readUploadForm(form!);
    const bytes = new Uint8Array(await options.file.arrayBuffer());
    const info = { name: options.file.name || "upload", sha256: createHash("sha256").update(bytes).digest("hex"), sizeBytes: bytes.byteLength };
    await assertStudyTakesFile(db(), { study, file: info });
    const file: CheckedFile = { studyId: id, kind: study.kind, analyte, options, bytes, info, actor: actorOf(caller) };

    if (wantsProgress(request)) return progressStream(file, new URL(request.url).pathname);
    const upload = await checkAndKeep(file);
    return Response.json(upload, {
      status: 201,
      headers: { location: `/api/v1/studies/${id}/uploads/${upload.id}`, "cache-control": "no-store" },
    });
  },
);
