/**
 * lib/uploads: healthy-donor uploads (CSV or XLSX bytes) → a validation report of donor
 * results. No database, no framework, no files: a workbook's parts are put in reading order in
 * memory (zip-order.ts), so exceljs never parks a sheet in a temporary file. Node only
 * (node:stream, Buffer). A file refused whole throws {@link UploadError} (code → HTTP status in
 * UPLOAD_ERROR_STATUS); row problems are listed in the report.
 */
export {
  TEMPLATE_COLUMNS,
  ROUTINE_COLUMNS,
  UPLOAD_COLUMNS,
  EXAMPLE_DONOR_CODE,
  type TemplateColumn,
  type RoutineColumn,
  type UploadColumn,
  type ColumnSet,
  type ColumnMapping,
} from "./columns";
export { UploadError, UPLOAD_ERROR_STATUS, type UploadErrorCode, type UploadErrorDetails } from "./errors";
export { MAX_UPLOAD_BYTES, TOO_LARGE as UPLOAD_TOO_LARGE_MESSAGE, type UploadInput } from "./input";
export type { ResolvedMapping } from "./mapping";
export {
  checkUpload,
  MAX_DATA_ROWS,
  MAX_LISTED_PROBLEMS,
  MAX_AGE_YEARS,
  DAYS_PER_YEAR,
  type CheckOptions,
  type ConvertUnit,
  type DonorRow,
  type CensoringSide,
  type UploadProblem,
  type UploadProgress,
  type ValidationReport,
} from "./check";
export { inspectUpload, previewUpload, type InspectOptions, type PreviewOptions, type UploadInspection, type UploadPreview } from "./preview";
export { suggestMapping } from "./suggest";
export { templateCsv, templateXlsx, type TemplateOptions } from "./template";
export { readValueColumn, MAX_VALUE_ROWS, type ValueColumn } from "./value-column";
