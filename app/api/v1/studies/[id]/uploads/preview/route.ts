import { createHash } from "node:crypto";
import { db } from "@/db/client";
import { findStudy } from "@/db/queries/studies";
import { assertStudyTakesFile } from "@/db/queries/uploads";
import { AppError } from "@/lib/api/errors";
import { apiRoute } from "@/lib/api/handler";
import { studyIdParams } from "@/lib/studies/input";
import { readUploadForm, UPLOAD_MULTIPART, uploadRefusal } from "@/lib/studies/upload-form";
import { inspectUpload, ROUTINE_COLUMNS, TEMPLATE_COLUMNS, UploadError } from "@/lib/uploads";

export const dynamic = "force-dynamic";

/** Rows of the file shown with the mapping applied. */
const PREVIEW_ROWS = 10;

/**
 * The columns of a file before it is checked: its headers, the mapping (the one sent, or else a
 * guess from the headers), whether that mapping is complete, and the first rows as the file has
 * them and with the mapping applied. The same form fields as an upload; stores nothing.
 */
export const POST = apiRoute(
  { permission: "studies:write", params: studyIdParams, multipart: UPLOAD_MULTIPART },
  async ({ params: { id }, form }) => {
    const study = await findStudy(db(), { id });
    if (!study) throw new AppError("not_found", `There is no study with the id ${id}.`);
    const { file, mapping, sheet } = readUploadForm(form!);
    const bytes = new Uint8Array(await file.arrayBuffer());
    const sha256 = createHash("sha256").update(bytes).digest("hex");
    await assertStudyTakesFile(db(), { study, file: { name: file.name || "upload", sha256, sizeBytes: bytes.byteLength } });
    try {
      const columns = study.kind === "indirect" ? ROUTINE_COLUMNS : TEMPLATE_COLUMNS;
      const inspection = await inspectUpload(bytes, { mapping, sheet, suggest: true, rows: PREVIEW_ROWS, columns });
      return { fileName: file.name || "upload", sizeBytes: bytes.byteLength, ...inspection };
    } catch (err) {
      if (err instanceof UploadError) throw uploadRefusal(err);
      throw err;
    }
  },
);
