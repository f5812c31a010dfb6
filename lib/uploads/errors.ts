/**
 * Why a whole upload was refused. lib/uploads imports nothing of the API layer: the route
 * handler maps each code to its problem+json status through {@link UPLOAD_ERROR_STATUS}.
 * Row-level problems are never thrown: they go into the validation report.
 */
export type UploadErrorCode =
  | "unreadable" // neither a CSV nor an XLSX workbook (binary, a ZIP that is no workbook, a legacy .xls)
  | "encoding" // text that is not UTF-8 (with or without BOM) nor UTF-16 with a BOM
  | "malformed" // text that cannot be read as CSV: a quoted field never closed, a control character
  | "empty" // no bytes, or nothing but blank lines
  | "no_data_rows" // a header row and nothing under it
  | "too_large" // over MAX_UPLOAD_BYTES
  | "too_many_rows" // over MAX_DATA_ROWS data rows
  | "unknown_sheet" // options.sheet names no sheet of the workbook
  | "mapping"; // the mapping names unknown columns or headers, or leaves a required column unmapped

/** The HTTP status each refusal should be answered with (4xx: the file or the request is at fault). */
export const UPLOAD_ERROR_STATUS: Record<UploadErrorCode, 413 | 415 | 422> = {
  unreadable: 415,
  encoding: 415,
  malformed: 422,
  empty: 422,
  no_data_rows: 422,
  too_large: 413,
  too_many_rows: 413,
  unknown_sheet: 422,
  mapping: 422,
};

export interface UploadErrorDetails {
  /** The file's headers, when they were read before the refusal (mapping refusals), for the mapping form. */
  headers?: string[];
  /** The workbook's sheet names, in tab order (unknown sheet). */
  sheets?: string[];
}

export class UploadError extends Error {
  readonly code: UploadErrorCode;
  readonly details: UploadErrorDetails;

  constructor(code: UploadErrorCode, message: string, details: UploadErrorDetails = {}) {
    super(message);
    this.name = "UploadError";
    this.code = code;
    this.details = details;
  }

  get status(): 413 | 415 | 422 {
    return UPLOAD_ERROR_STATUS[this.code];
  }
}
