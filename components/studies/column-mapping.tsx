"use client";

import { type ColumnMapping, type UploadColumn, type UploadPreviewAnswer } from "./upload-types";

const NEEDS: Record<UploadColumn, string> = {
  patient_key: "required: a pseudonymous key, one per patient",
  collected_at: "required: date and time, YYYY-MM-DDTHH:MM",
  setting: "optional: outpatient, inpatient …",
  flags: "optional: separated by ; or |",
  donor_code: "required",
  sex: "required: F or M",
  age_years: "or birth date with collection date",
  birth_date: "with collected_on, instead of age",
  collected_on: "optional with age_years",
  value: "required; <0.5 is kept as censored",
  unit: "optional: the analyte's unit when empty",
};

const cellClass = "whitespace-nowrap px-2.5 py-1.5";

/**
 * The file's headers against the template's columns, with the first rows shown as they would be
 * read. The mapping is applied here, in the browser, to the rows the preview returned, so a
 * change shows at once.
 */
export function ColumnMappingForm({
  preview,
  mapping,
  onChange,
  showSelectors,
}: {
  preview: UploadPreviewAnswer;
  mapping: ColumnMapping;
  onChange: (mapping: ColumnMapping) => void;
  showSelectors: boolean;
}) {
  // The columns the study reads: the preview's mapping has one key for each.
  const columns = Object.keys(preview.mapping) as UploadColumn[];
  const indexOf = (column: UploadColumn) => {
    const header = mapping[column];
    return header ? preview.headers.indexOf(header) : -1;
  };
  const options = [{ value: "", label: "— not in the file —" }, ...preview.headers.map((h) => ({ value: h, label: h }))];
  return (
    <div className="space-y-3">
      {showSelectors ? (
        <fieldset className="space-y-2">
          <legend className="text-sm font-medium text-ink-800">Which column of the file holds each template column?</legend>
          <div className="grid gap-2 sm:grid-cols-2 xl:grid-cols-4">
            {columns.map((column) => (
              <div key={column} className="space-y-0.5">
                <label htmlFor={`map-${column}`} className="block font-mono text-xs font-semibold text-ink-700">
                  {column}
                </label>
                <select
                  id={`map-${column}`}
                  value={mapping[column] ?? ""}
                  onChange={(e) => onChange({ ...mapping, [column]: e.target.value || undefined })}
                  className="block w-full rounded-md border border-ink-300 bg-white px-2 py-1 text-sm focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500"
                  aria-describedby={`map-${column}-needs`}
                >
                  {options.map((o) => (
                    <option key={o.value} value={o.value}>
                      {o.label}
                    </option>
                  ))}
                </select>
                <p id={`map-${column}-needs`} className="text-xs text-ink-500">
                  {NEEDS[column]}
                </p>
              </div>
            ))}
          </div>
        </fieldset>
      ) : null}
      <div className="overflow-x-auto rounded-md border border-ink-200">
        <table className="min-w-full divide-y divide-ink-200 text-sm" data-testid="mapping-preview">
          <caption className="px-2.5 py-1.5 text-left text-xs text-ink-600">
            The first {preview.fileRows.length} rows as they will be read (not checked yet)
          </caption>
          <thead className="bg-ink-50">
            <tr>
              <th scope="col" className={`${cellClass} text-left text-xs font-semibold text-ink-600`}>
                Row
              </th>
              {columns.map((c) => (
                <th key={c} scope="col" className={`${cellClass} text-left text-xs font-semibold text-ink-600`}>
                  <span className="font-mono">{c}</span>
                  <span className="block font-normal text-ink-500">{mapping[c] ? `from “${mapping[c]}”` : "not mapped"}</span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100 bg-white">
            {preview.fileRows.map((r) => (
              <tr key={r.row}>
                <td className={`${cellClass} text-ink-500`}>{r.row}</td>
                {columns.map((c) => {
                  const i = indexOf(c);
                  return (
                    <td key={c} className={`${cellClass} ${i === -1 ? "text-ink-400" : ""}`}>
                      {i === -1 ? "—" : r.cells[i] || <span className="text-ink-400">empty</span>}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
