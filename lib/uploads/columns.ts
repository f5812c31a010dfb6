/** The template's columns, in the order of the blank template. */
export const TEMPLATE_COLUMNS = ["donor_code", "sex", "age_years", "birth_date", "collected_on", "value", "unit"] as const;

export type TemplateColumn = (typeof TEMPLATE_COLUMNS)[number];

/** Template column → the file's header that holds it, when the file's headers differ from the template. */
export type ColumnMapping = Partial<Record<TemplateColumn, string>>;

/**
 * The donor code of the blank template's example row. A row with this code is reported as a
 * problem ("delete it"), so an example left in a filled-in template can never be stored as a
 * donor result.
 */
export const EXAMPLE_DONOR_CODE = "EXAMPLE";

/** One cell as read from either format: CSV gives strings only; XLSX also numbers, booleans, dates. */
export type Cell = string | number | boolean | Date | null | undefined;
