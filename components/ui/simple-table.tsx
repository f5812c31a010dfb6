import type { ReactNode } from "react";

/**
 * A read-only table in the house style (the same look as the data table, without its sorting or
 * filtering): for short lists a server page renders whole. It scrolls inside its panel when narrow.
 */
export function SimpleTable({ caption, head, rows, empty, testId }: {
  caption: string;
  head: ReactNode[];
  rows: ReactNode[][];
  empty?: ReactNode;
  testId?: string;
}) {
  return (
    <div className="overflow-x-auto rounded-md border border-ink-200 print:overflow-visible">
      <table className="min-w-full divide-y divide-ink-200 text-sm" data-testid={testId}>
        <caption className="sr-only">{caption}</caption>
        <thead className="bg-ink-50">
          <tr>
            {head.map((h, i) => (
              <th key={i} scope="col" className="px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-ink-600">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody className="divide-y divide-ink-100 bg-white">
          {rows.length === 0 ? (
            <tr>
              <td colSpan={head.length} className="px-3 py-4 text-center text-ink-500">
                {empty ?? "Nothing to show."}
              </td>
            </tr>
          ) : (
            rows.map((cells, r) => (
              <tr key={r}>
                {cells.map((c, i) => (
                  <td key={i} className="px-3 py-2 align-top text-ink-800">
                    {c}
                  </td>
                ))}
              </tr>
            ))
          )}
        </tbody>
      </table>
    </div>
  );
}
