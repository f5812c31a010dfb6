import { z } from "zod";
import { AppError, type ErrorCode } from "@/lib/api/errors";
import { ROUTINE_COLUMNS, TEMPLATE_COLUMNS, UPLOAD_COLUMNS, UPLOAD_TOO_LARGE_MESSAGE, type ColumnMapping, type UploadError } from "@/lib/uploads";

/** The multipart request's size limit: the 20 MB file plus room for the other fields and the boundaries. */
export const UPLOAD_REQUEST_MAX_BYTES = 20 * 1024 * 1024 + 256 * 1024;

/**
 * `apiRoute`'s multipart option for the upload routes: a request too large to hold a 20 MB file
 * is refused in the words lib/uploads uses for a file over 20 MB.
 */
export const UPLOAD_MULTIPART = { maxBytes: UPLOAD_REQUEST_MAX_BYTES, tooLarge: UPLOAD_TOO_LARGE_MESSAGE };

const mappingSchema = z.partialRecord(z.enum(UPLOAD_COLUMNS), z.string().trim().min(1).max(200));

/** The query of GET /api/v1/uploads/template: the format, and the analyte whose unit the example row takes. */
export const templateQuery = z
  .object({
    format: z.enum(["csv", "xlsx"], "format is csv or xlsx."),
    analyte: z.string().trim().min(1).max(16).optional(),
    /** `routine`: the routine-results template of an indirect study; default the healthy-donor one. */
    kind: z.enum(["donors", "routine"], "kind is donors or routine.").optional(),
  })
  .strict();

/** The longest file name kept with an upload (most file systems allow 255). */
const MAX_FILE_NAME_LENGTH = 255;

function invalid(path: string, message: string): AppError {
  return new AppError("invalid", `${path}: ${message}`, { errors: [{ path, message }] });
}

/**
 * The upload form's fields as the API documents them (OpenAPI): what `readUploadForm` reads. The
 * file is bytes, so the form is read by hand rather than parsed with this schema.
 */
export const uploadFormSchema = z.object({
  file: z.string().meta({ format: "binary", description: "The CSV or XLSX file of healthy-donor results, at most 20 MB" }),
  mapping: z
    .string()
    .optional()
    .meta({
      description: `JSON object from template columns (${TEMPLATE_COLUMNS.join(", ")}; for an indirect study ${ROUTINE_COLUMNS.join(", ")}) to the file's headers`,
      example: '{"value":"Result"}',
    }),
  decimalComma: z.enum(["true", "false"]).optional().meta({ description: 'Whether numbers are written with a decimal comma ("4,2"); default false' }),
  sheet: z.string().optional().meta({ description: "The XLSX sheet to read; default the first" }),
});

export interface UploadForm {
  file: File;
  mapping?: ColumnMapping;
  decimalComma: boolean;
  sheet?: string;
}

/** Reads the upload form's fields: `file`, and the optional `mapping` (JSON), `decimalComma` and `sheet`. */
export function readUploadForm(form: FormData): UploadForm {
  const file = form.get("file");
  if (!(file instanceof File)) throw invalid("file", "Attach the file (CSV or XLSX) in the field named file.");
  if (file.name.length > MAX_FILE_NAME_LENGTH) {
    throw invalid("file", `The file name is ${file.name.length} characters long; rename the file to at most ${MAX_FILE_NAME_LENGTH} characters.`);
  }

  let mapping: ColumnMapping | undefined;
  const mappingText = form.get("mapping");
  if (typeof mappingText === "string" && mappingText.trim() !== "") {
    let parsed: unknown;
    try {
      parsed = JSON.parse(mappingText);
    } catch {
      throw invalid("mapping", "The mapping is not valid JSON.");
    }
    const result = mappingSchema.safeParse(parsed);
    if (!result.success) {
      throw invalid("mapping", `The mapping must be a JSON object from template columns (${UPLOAD_COLUMNS.join(", ")}) to the file's headers.`);
    }
    mapping = result.data;
  }

  const decimalCommaText = form.get("decimalComma");
  let decimalComma = false;
  if (decimalCommaText !== null && decimalCommaText !== "") {
    if (decimalCommaText !== "true" && decimalCommaText !== "false") throw invalid("decimalComma", 'decimalComma is "true" or "false".');
    decimalComma = decimalCommaText === "true";
  }

  const sheetText = form.get("sheet");
  const sheet = typeof sheetText === "string" && sheetText.trim() !== "" ? sheetText : undefined;
  return { file, mapping, decimalComma, sheet };
}

const REFUSAL_CODE: Record<413 | 415 | 422, ErrorCode> = { 413: "payload_too_large", 415: "unsupported_media_type", 422: "invalid" };

/** A file refused whole, as the API answers it: the status lib/uploads gives, its message, its code and details. */
export function uploadRefusal(err: UploadError): AppError {
  return new AppError(REFUSAL_CODE[err.status], err.message, { ...err.details, uploadError: err.code });
}
