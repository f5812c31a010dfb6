import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import type { RegisterRow } from "./types";

const cellLines = "space-y-1 whitespace-nowrap";

/**
 * The intervals register (UX.md): one row per analyte in force, with its limits by partition,
 * method and n, the version, who signed it off and when, and the review date with "overdue" in
 * words. Read-only; the same for every role.
 */
export function RegisterTable({ rows }: { rows: RegisterRow[] }) {
  const head = ["Analyte", "Partition", "Limits", "Method and n", "Version", "Signed off", "Review by"];
  return (
    <div className="overflow-x-auto rounded-md border border-ink-200">
      <table className="min-w-full divide-y divide-ink-200 text-sm" data-testid="intervals-register">
        <caption className="sr-only">Reference intervals in force, one row per analyte</caption>
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
          {rows.map(({ code, name, loinc, unit, version: v }) => (
            <tr key={code} data-analyte={code} className="align-top">
              <th scope="row" className="px-3 py-2 text-left font-normal">
                <Link href={`/intervals/${code}`} className="font-medium">
                  {name}
                </Link>
                <span className="block text-xs text-ink-600">
                  {code}
                  {loinc ? ` · LOINC ${loinc}` : ""}
                </span>
                <Link href={`/score?analyte=${code}`} className="text-xs">
                  Score a value
                </Link>
              </th>
              <td className="px-3 py-2">
                <ul className={cellLines}>
                  {v.partitions.map((p, i) => (
                    <li key={i}>{p.scope}</li>
                  ))}
                </ul>
              </td>
              <td className="px-3 py-2 tabular-nums">
                <ul className={cellLines}>
                  {v.partitions.map((p, i) => (
                    <li key={i}>
                      <span className="font-semibold text-ink-900">{p.limits}</span> {unit}
                    </li>
                  ))}
                </ul>
              </td>
              <td className="px-3 py-2">
                <ul className={cellLines}>
                  {v.partitions.map((p, i) => (
                    <li key={i}>
                      {p.method}, n = {p.n.toLocaleString("en")}
                    </li>
                  ))}
                </ul>
              </td>
              <td className="whitespace-nowrap px-3 py-2">
                Version {v.number}
                <span className="block text-xs text-ink-600">in force since {v.effectiveFrom ?? "—"}</span>
              </td>
              <td className="px-3 py-2">
                {v.signedOff ? (
                  <>
                    {v.signedOff.by}
                    <span className="block whitespace-nowrap text-xs text-ink-600">{v.signedOff.at}</span>
                  </>
                ) : (
                  "—"
                )}
                {v.reviewed ? (
                  <span className="mt-1 block text-xs text-ink-600">
                    Reviewed by {v.reviewed.by}, {v.reviewed.at}
                  </span>
                ) : null}
              </td>
              <td className="whitespace-nowrap px-3 py-2 tabular-nums">
                {v.reviewBy ?? "—"}
                {v.reviewWords ? (
                  <span className="mt-0.5 block">
                    <Badge tone={v.overdue ? "warn" : "neutral"}>{v.reviewWords}</Badge>
                  </span>
                ) : null}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
