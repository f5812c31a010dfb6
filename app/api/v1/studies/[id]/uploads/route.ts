import { createHash } from "node:crypto";
import { db } from "@/db/client";
import { findAnalyteById } from "@/db/queries/analytes";
import { findStudy } from "@/db/queries/studies";
import { assertStudyTakesFile, createPendingUpload, recordRefusedUpload } from "@/db/queries/uploads";
import { AppError, type ErrorCode } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { actorOf } from "@/lib/auth/session";
import { studyIdParams } from "@/lib/studies/input";
import { readUploadForm, UPLOAD_REQUEST_MAX_BYTES } from "@/lib/studies/upload-form";
import { convertUnit } from "@/lib/units/ucum";
import { checkUpload, UploadError } from "@/lib/uploads";

export const dynamic = "force-dynamic";

const STATUS_CODE: Record<413 | 415 | 422, ErrorCode> = { 413: "payload_too_large", 415: "unsupported_media_type", 422: "invalid" };

/**
 * Checks a file of healthy-donor results against the study's analyte and keeps it pending: the
 * validation report comes back, no donor result is stored until the upload is committed.
 */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, multipart: { maxBytes: UPLOAD_REQUEST_MAX_BYTES } },
  async ({ caller, params: { id }, form }) => {
    const study = await findStudy(db(), { id });
    if (!study) throw new AppError("not_found", `There is no study with the id ${id}.`);
    const analyte = await findAnalyteById(db(), { id: study.analyteId });
    if (!analyte) throw new AppError("not_found", `The study's analyte no longer exists.`);
    const { file, mapping, decimalComma, sheet } = readUploadForm(form!);
    const bytes = new Uint8Array(await file.arrayBuffer());
    const info = { name: file.name || "upload", sha256: createHash("sha256").update(bytes).digest("hex"), sizeBytes: bytes.byteLength };
    const actor = actorOf(caller);
    await assertStudyTakesFile(db(), { study, file: info });

    let report;
    try {
      report = await checkUpload(bytes, {
        unit: analyte.unit,
        mapping,
        decimalComma,
        sheet,
        convertUnit: (value, from, to) => convertUnit({ value, from, to, molarMass: analyte.molarMass }),
      });
    } catch (err) {
      if (!(err instanceof UploadError)) throw err;
      await recordRefusedUpload(db(), { studyId: id, file: info, reason: err.message, actor });
      throw new AppError(STATUS_CODE[err.status], err.message, { ...err.details, uploadError: err.code });
    }
    const upload = await createPendingUpload(db(), { studyId: id, file: info, report, actor });
    return Response.json(
      {
        id: upload.id,
        status: "pending",
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
      },
      { status: 201, headers: { location: `/api/v1/studies/${id}/uploads/${upload.id}`, "cache-control": "no-store" } },
    );
  },
);
