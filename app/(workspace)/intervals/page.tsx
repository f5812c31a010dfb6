import type { Metadata } from "next";
import Link from "next/link";
import { RegisterTable } from "@/components/intervals/register-table";
import type { RegisterRow } from "@/components/intervals/types";
import { PageHeader, Panel } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listAnalytes } from "@/db/queries/analytes";
import { listAnalyteVersionStates } from "@/db/queries/intervals";
import { listIntervalVersions } from "@/db/queries/interval-versions";
import { can } from "@/lib/auth/roles";
import { requirePageCaller } from "@/lib/auth/session";
import { formatDate } from "@/lib/format";
import { noIntervalReason } from "@/lib/versions/availability";
import { versionView } from "./view";

export const metadata: Metadata = { title: "Intervals" };

/**
 * The register of the reference intervals in force (UX.md, Intervals register): what every role
 * may read. Lab roles reach each analyte's version history from here.
 */
export default async function IntervalsPage() {
  const caller = await requirePageCaller("intervals:read");
  const database = db();
  const [catalogue, inForce, states] = await Promise.all([
    listAnalytes(database),
    listIntervalVersions(database, { query: { state: "in_force" } }),
    listAnalyteVersionStates(database),
  ]);
  const now = new Date();
  const byCode = new Map(catalogue.map((a) => [a.code, a]));
  const rows: RegisterRow[] = inForce.flatMap((v) => {
    const a = byCode.get(v.analyte.code);
    return a ? [{ code: a.code, name: a.name, loinc: a.loinc, unit: v.unit, version: versionView(v, now) }] : [];
  });
  rows.sort((x, y) => x.name.localeCompare(y.name));
  const inForceCodes = new Set(rows.map((r) => r.code));
  const without = states
    .filter((s) => !inForceCodes.has(s.code))
    .map((s) => ({ analyte: byCode.get(s.code), reason: noIntervalReason(s.states, s.withdrawnAt ? formatDate(s.withdrawnAt) : null) }));
  const overdue = rows.filter((r) => r.version.overdue).length;
  const lab = can(caller.role, "studies:write");
  return (
    <>
      <PageHeader
        title="Intervals"
        lead={
          <>
            The reference intervals in force: central 95% of healthy reference individuals, by partition, with the method, the
            number of reference individuals, the version and its sign-off.{" "}
            {lab
              ? "Open an analyte for the history of its versions."
              : "Open an analyte for its interval's details, or score a value against it."}
          </>
        }
      />
      <div className="space-y-5">
        {rows.length === 0 ? (
          <div className="rounded-lg border border-dashed border-ink-300 bg-white px-4 py-6 text-sm text-ink-600 [&_a]:underline" data-testid="register-empty">
            <p className="font-medium text-ink-900">No interval is in force yet.</p>
            <p>
              {lab ? (
                <>
                  An interval comes into force when the director signs a version off: start from a <Link href="/studies">study</Link> or an{" "}
                  <Link href="/adoption-checks">adoption check</Link>.
                </>
              ) : (
                "Intervals appear here once the laboratory director signs them off."
              )}
            </p>
          </div>
        ) : (
          <Panel
            title={`${rows.length} analyte${rows.length === 1 ? "" : "s"} in force`}
            actions={
              overdue > 0 ? (
                <span className="text-sm font-medium text-amber-800" data-testid="overdue-count">
                  {overdue} overdue for review
                </span>
              ) : (
                <span className="text-sm text-ink-600">None overdue for review</span>
              )
            }
          >
            <RegisterTable rows={rows} />
          </Panel>
        )}
        {without.length > 0 ? (
          <Panel title="No interval in force">
            <ul className="divide-y divide-ink-100 text-sm" data-testid="not-in-force">
              {without.map(({ analyte, reason }) =>
                analyte ? (
                  <li key={analyte.code} className="flex flex-wrap justify-between gap-2 py-1.5">
                    <span>
                      {lab ? <Link href={`/intervals/${analyte.code}`}>{analyte.name}</Link> : analyte.name}{" "}
                      <span className="text-ink-600">({analyte.code})</span>
                    </span>
                    <span className="text-ink-600">{reason}</span>
                  </li>
                ) : null,
              )}
            </ul>
          </Panel>
        ) : null}
      </div>
    </>
  );
}
