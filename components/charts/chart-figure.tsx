import type { ReactNode } from "react";

/**
 * A chart with its one-line caption and, for screen readers, the same content as a table or
 * list (UX.md, Charts). The canvas itself is hidden from assistive technology.
 */
export function ChartFigure({
  caption,
  alternative,
  children,
  height = 260,
  testId,
}: {
  caption: string;
  alternative: ReactNode;
  children: ReactNode;
  height?: number;
  testId?: string;
}) {
  return (
    <figure className="min-w-0 space-y-1.5" data-testid={testId}>
      <div className="relative w-full" style={{ height }} aria-hidden="true">
        {children}
      </div>
      <figcaption className="text-xs text-ink-600">{caption}</figcaption>
      <div className="sr-only">{alternative}</div>
    </figure>
  );
}

/** A plain table for a chart's screen-reader alternative. */
export function AltTable({ caption, head, rows }: { caption: string; head: string[]; rows: (string | number)[][] }) {
  return (
    <table>
      <caption>{caption}</caption>
      <thead>
        <tr>
          {head.map((h) => (
            <th key={h} scope="col">
              {h}
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {rows.map((r, i) => (
          <tr key={i}>
            {r.map((c, j) => (
              <td key={j}>{c}</td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
