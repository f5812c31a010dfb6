"use client";

const area =
  "block w-full rounded-md border border-ink-300 bg-white px-2.5 py-1.5 font-mono text-sm text-ink-900 focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500 aria-[invalid=true]:border-signal-high";

/**
 * The 20 local values: typed or pasted (one per line, or separated by spaces or commas), or a
 * one-column CSV or Excel file, which is read on the server instead of the text when chosen.
 */
export function ValuesField({ idPrefix, unit, error, label }: { idPrefix: string; unit: string | null; error?: string; label: string }) {
  const id = `${idPrefix}-values`;
  return (
    <fieldset className="space-y-2">
      <legend className="text-xs font-medium uppercase tracking-wide text-ink-600">{label}</legend>
      <div className="space-y-1">
        <label htmlFor={id} className="block text-sm text-ink-700">
          Type or paste 20 values{unit ? ` in ${unit}` : " in the analyte's unit"}
        </label>
        <textarea
          id={id}
          name="values"
          rows={5}
          className={area}
          placeholder={"4.1\n3.9\n4.6\n…"}
          aria-invalid={error ? true : undefined}
          aria-describedby={`${id}-hint`}
        />
        <p id={`${id}-hint`} className={`text-xs ${error ? "text-signal-high" : "text-ink-500"}`}>
          {error ?? "One per line, or separated by spaces or commas; use a decimal point."}
        </p>
      </div>
      <div className="space-y-1">
        <label htmlFor={`${idPrefix}-file`} className="block text-sm text-ink-700">
          Or choose a one-column CSV or Excel file (a header row is optional)
        </label>
        <input
          id={`${idPrefix}-file`}
          name="file"
          type="file"
          accept=".csv,.txt,.xlsx,text/csv,application/vnd.openxmlformats-officedocument.spreadsheetml.sheet"
          className="block w-full text-sm text-ink-700 file:mr-3 file:rounded-md file:border file:border-ink-300 file:bg-white file:px-3 file:py-1.5 file:text-sm file:font-medium file:text-ink-800 hover:file:bg-ink-100"
        />
      </div>
    </fieldset>
  );
}
