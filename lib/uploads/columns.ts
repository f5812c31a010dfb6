/** The template's columns, in the order of the blank template. */
export const TEMPLATE_COLUMNS = ["donor_code", "sex", "age_years", "birth_date", "collected_on", "value", "unit"] as const;

/**
 * The routine-results template's columns (indirect studies), in the order of its blank template:
 * a pseudonymous patient key instead of a donor code (one patient may have many results), the
 * collection date and time instead of the day, and the setting and flags the laboratory system
 * recorded. The age comes from age_years, or from birth_date and the date of collected_at.
 */
export const ROUTINE_COLUMNS = ["patient_key", "sex", "age_years", "birth_date", "collected_at", "value", "unit", "setting", "flags"] as const;

/** Every column any upload may read. */
export const UPLOAD_COLUMNS = [...TEMPLATE_COLUMNS, "patient_key", "collected_at", "setting", "flags"] as const;

export type TemplateColumn = (typeof TEMPLATE_COLUMNS)[number];
export type RoutineColumn = (typeof ROUTINE_COLUMNS)[number];
export type UploadColumn = (typeof UPLOAD_COLUMNS)[number];

/** The columns an upload reads: a healthy-donor file's, or a routine-results file's. */
export type ColumnSet = readonly UploadColumn[];

/** Template column → the file's header that holds it, when the file's headers differ from the template. */
export type ColumnMapping = Partial<Record<UploadColumn, string>>;

/**
 * The donor code of the blank template's example row. A row with this code is reported as a
 * problem ("delete it"), so an example left in a filled-in template can never be stored as a
 * donor result.
 */
export const EXAMPLE_DONOR_CODE = "EXAMPLE";

/** One cell as read from either format: CSV gives strings only; XLSX also numbers, booleans, dates. */
export type Cell = string | number | boolean | Date | null | undefined;
