import { Fragment } from "react";
import type { FlagCounts, LisUsageOut } from "@/lib/lis/input";

const n = (v: number) => v.toLocaleString("en");

/** "1,204 (L 31 · N 1,150 · H 23)", with the critical flags only when there are any. */
function Counts({ counts }: { counts: FlagCounts }) {
  if (counts.total === 0) return <span className="text-ink-400">0</span>;
  const parts = [`L ${n(counts.L)}`, `N ${n(counts.N)}`, `H ${n(counts.H)}`];
  if (counts.LL) parts.unshift(`LL ${n(counts.LL)}`);
  if (counts.HH) parts.push(`HH ${n(counts.HH)}`);
  return (
    <span className="tabular-nums">
      <span className="font-medium">{n(counts.total)}</span> <span className="text-xs text-ink-600">({parts.join(" · ")})</span>
    </span>
  );
}

const th = "px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-ink-600";

/**
 * Scores each LIS connection asked for over the last 24 hours and 7 days, with their flags, and
 * per analyte beneath each connection (from the de-identified score log).
 */
export function UsageTable({ usage }: { usage: LisUsageOut }) {
  const used = usage.connections.filter((c) => c.last7d.total > 0);
  if (used.length === 0) {
    return (
      <p className="rounded-md border border-ink-200 px-3 py-6 text-center text-sm text-ink-600" data-testid="lis-usage-empty">
        No LIS connection has scored a value in the last 7 days. Scores sent with a key appear here, counted per connection and per analyte.
      </p>
    );
  }
  return (
    <div className="overflow-x-auto rounded-md border border-ink-200">
      <table className="min-w-full divide-y divide-ink-200 text-sm" data-testid="lis-usage">
        <caption className="sr-only">Scores per LIS connection and analyte, last 24 hours and last 7 days, with flags L, N and H</caption>
        <thead className="bg-ink-50">
          <tr>
            <th scope="col" className={th}>
              Connection / analyte
            </th>
            <th scope="col" className={th}>
              Last 24 hours
            </th>
            <th scope="col" className={th}>
              Last 7 days
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-ink-100 bg-white">
          {used.map((c) => (
            <Fragment key={c.id}>
              <tr className="bg-ink-50/60">
                <th scope="row" className="px-3 py-2 text-left font-medium text-ink-900">
                  {c.name} <code className="text-xs font-normal text-ink-500">{c.keyPrefix}…</code>
                  {c.status === "revoked" ? <span className="ml-1 text-xs font-normal text-ink-500">(revoked)</span> : null}
                </th>
                <td className="px-3 py-2">
                  <Counts counts={c.last24h} />
                </td>
                <td className="px-3 py-2">
                  <Counts counts={c.last7d} />
                </td>
              </tr>
              {c.analytes.map((a) => (
                <tr key={`${c.id}-${a.code}`}>
                  <th scope="row" className="py-1.5 pl-8 pr-3 text-left font-normal text-ink-800">
                    <span className="font-mono text-xs">{a.code}</span> {a.name}
                  </th>
                  <td className="px-3 py-1.5">
                    <Counts counts={a.last24h} />
                  </td>
                  <td className="px-3 py-1.5">
                    <Counts counts={a.last7d} />
                  </td>
                </tr>
              ))}
            </Fragment>
          ))}
        </tbody>
      </table>
    </div>
  );
}
