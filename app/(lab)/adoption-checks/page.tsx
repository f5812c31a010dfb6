import type { Metadata } from "next";
import { ChecksTable } from "@/components/adoption/checks-table";
import { NewCheckForm } from "@/components/adoption/new-check-form";
import { intervalText, SEX_WORDS, type CheckRow } from "@/components/adoption/types";
import { PageHeader, Panel } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listAdoptionChecks } from "@/db/queries/adoption-checks";
import { listAnalytes } from "@/db/queries/analytes";
import { requirePageCaller } from "@/lib/auth/session";
import { formatDate } from "@/lib/format";
import { createAdoptionCheckAction } from "./actions";

export const metadata: Metadata = { title: "Adoption checks" };

/** Verifications of intervals the laboratory did not establish itself, and the form for a new one. */
export default async function AdoptionChecksPage() {
  await requirePageCaller("studies:write");
  const [checks, analytes] = await Promise.all([listAdoptionChecks(db(), { query: {} }), listAnalytes(db())]);
  const rows: CheckRow[] = checks.map((c) => ({
    id: c.id,
    analyte: c.analyte.code,
    analyteName: c.analyte.name,
    interval: intervalText(c.lower, c.upper, c.analyte.unit),
    sex: c.sex ? SEX_WORDS[c.sex] : "Both",
    source: c.source,
    decision: c.decision,
    outside: c.second ? `${c.first.outside}/${c.first.n}, then ${c.second.outside}/${c.second.n}` : `${c.first.outside}/${c.first.n}`,
    checkedOn: formatDate(c.createdAt),
  }));
  const choices = analytes.map((a) => ({ code: a.code, name: a.name, unit: a.unit }));
  return (
    <>
      <PageHeader
        title="Adoption checks"
        lead="Verify an interval the laboratory did not establish itself (a manufacturer's insert, a publication) on 20 local healthy donors: at most 2 of 20 outside accepts it; 3 or 4 call for 20 more. An accepted interval can be drafted as a version and signed off like any other."
      />
      <div className="grid items-start gap-5 2xl:grid-cols-[1fr_26rem]">
        <Panel title={rows.length === 1 ? "1 adoption check" : `${rows.length} adoption checks`}>
          {rows.length === 0 ? (
            <div className="space-y-2 py-4 text-sm text-ink-600" data-testid="checks-empty">
              <p className="font-medium text-ink-900">No interval has been checked yet.</p>
              <p>Enter the first with the form: the analyte, the interval and where it comes from, and 20 local healthy-donor values.</p>
            </div>
          ) : (
            <ChecksTable rows={rows} />
          )}
        </Panel>
        <Panel title="New adoption check">
          <NewCheckForm action={createAdoptionCheckAction} analytes={choices} />
        </Panel>
      </div>
    </>
  );
}
