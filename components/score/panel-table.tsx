import type { ScoreItemError, ScoreResponse, ScoreResult } from "@/lib/scores/schemas";
import { itemNextStep } from "./api";
import { FlagBadge } from "./score-card";
import { FLAG_WORDS, intervalText, partitionWords, percentileText, valueText, zText } from "./words";

type Row = { label: string; code: string; result: ScoreResult | ScoreItemError };

const isError = (r: ScoreResult | ScoreItemError): r is ScoreItemError => "error" in r;

/**
 * A panel's answer: one row per analyte with the essentials of its card (value, unit, flag,
 * interval, z, percentile), then every caution once, in full, with the rows it applies to.
 */
export function PanelTable({ rows, cautionTexts }: { rows: Row[]; cautionTexts: ScoreResponse["cautionTexts"] }) {
  const scored = rows.filter((r): r is Row & { result: ScoreResult } => !isError(r.result));
  const codes: string[] = [];
  for (const r of scored) for (const c of r.result.cautions) if (!codes.includes(c)) codes.push(c);
  const numberOf = (code: string) => codes.indexOf(code) + 1;
  const head = ["Analyte", "Value", "Unit", "Flag", "Reference interval", "z", "Percentile", "Cautions"];
  return (
    <div className="space-y-4" data-testid="panel-results">
      <div className="overflow-x-auto rounded-md border border-ink-200">
        <table className="min-w-full divide-y divide-ink-200 text-sm" data-testid="panel-table">
          <caption className="sr-only">Panel scores, one row per analyte</caption>
          <thead className="bg-ink-50">
            <tr>
              {head.map((h) => (
                <th key={h} scope="col" className="whitespace-nowrap px-3 py-2 text-left text-xs font-semibold uppercase tracking-wide text-ink-600">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100 bg-white">
            {rows.map(({ label, code, result }, i) => {
              if (isError(result)) {
                return (
                  <tr key={i} data-analyte={code}>
                    <th scope="row" className="px-3 py-2 text-left font-medium text-ink-900">
                      {label}
                    </th>
                    <td colSpan={7} className="px-3 py-2 text-signal-high" role="alert">
                      Not scored. {result.error.title ? `${result.error.title}. ` : ""}
                      {result.error.detail} <span className="text-ink-700">{itemNextStep(result.error.type)}</span>
                    </td>
                  </tr>
                );
              }
              const r = result;
              return (
                <tr key={i} data-analyte={code}>
                  <th scope="row" className="px-3 py-2 text-left font-medium text-ink-900">
                    {r.analyte.name} ({r.analyte.code})
                  </th>
                  <td className="px-3 py-2 text-right font-semibold tabular-nums">{valueText(r)}</td>
                  <td className="px-3 py-2 text-ink-700">{r.interval.unit}</td>
                  <td className="px-3 py-2">
                    <span className="flex items-center gap-2">
                      <FlagBadge flag={r.flag} />
                      <span className="text-xs text-ink-700">{FLAG_WORDS[r.flag]}</span>
                    </span>
                  </td>
                  <td className="px-3 py-2 tabular-nums">
                    {intervalText(r.interval)}
                    <span className="block text-xs text-ink-500">
                      {partitionWords(r.interval.partition)}; version {r.interval.version}
                    </span>
                  </td>
                  <td className="whitespace-nowrap px-3 py-2 text-right tabular-nums">{zText(r.z, r.percentileBound)}</td>
                  <td className="whitespace-nowrap px-3 py-2 text-right tabular-nums">{percentileText(r.percentile, r.percentileBound)}</td>
                  <td className="px-3 py-2 text-ink-700">{r.cautions.map(numberOf).join(", ")}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {codes.length > 0 ? (
        <section aria-labelledby="panel-cautions" className="space-y-2">
          <h3 id="panel-cautions" className="text-sm font-semibold text-ink-800">
            Cautions
          </h3>
          <ol className="space-y-2" data-testid="panel-cautions">
            {codes.map((code, i) => {
              const applies = scored.filter((r) => r.result.cautions.includes(code));
              return (
                <li key={code} className="flex gap-2 text-sm text-ink-800" data-caution={code}>
                  <span className="w-5 shrink-0 font-semibold tabular-nums text-ink-600">{i + 1}.</span>
                  <span>
                    {cautionTexts[code] ?? code}{" "}
                    <span className="text-ink-600">
                      {applies.length === scored.length && scored.length > 1
                        ? "Applies to every row."
                        : `Applies to ${applies.map((r) => r.result.analyte.code).join(", ")}.`}
                    </span>
                  </span>
                </li>
              );
            })}
          </ol>
        </section>
      ) : null}
    </div>
  );
}
