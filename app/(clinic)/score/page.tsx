import type { Metadata } from "next";
import Link from "next/link";
import { ScoreWorkbench } from "@/components/score/score-workbench";
import type { ScoreAnalyte } from "@/components/score/types";
import { PageHeader } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listAnalytes } from "@/db/queries/analytes";
import { listAnalyteVersionStates } from "@/db/queries/intervals";
import { listIntervalVersions } from "@/db/queries/interval-versions";
import { formatDate } from "@/lib/format";
import { can } from "@/lib/auth/roles";
import { requirePageCaller } from "@/lib/auth/session";
import { noIntervalReason, patientScopeLabel } from "@/lib/versions/availability";
import { lmsScopeLabel } from "@/lib/scoring/lms-curves-view";
import { scopeLabel } from "@/lib/versions/comparison";

export const metadata: Metadata = { title: "Score" };

const one = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v) ?? "";

/**
 * Score a patient value, or a panel of them, against the intervals in force (UX.md, Score). The
 * catalogue and what is in force come from the database here; the scores themselves from
 * POST /api/v1/scores, the route the LIS calls.
 */
export default async function ScorePage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const caller = await requirePageCaller("scores:create");
  const params = await searchParams;
  const database = db();
  const [catalogue, inForce, states] = await Promise.all([
    listAnalytes(database),
    listIntervalVersions(database, { query: { state: "in_force" } }),
    listAnalyteVersionStates(database),
  ]);
  const versionOf = new Map(inForce.map((v) => [v.analyte.code, v]));
  const statesOf = new Map(states.map((s) => [s.code, s]));
  const analytes: ScoreAnalyte[] = catalogue.map((a) => {
    const v = versionOf.get(a.code);
    const s = statesOf.get(a.code);
    return {
      code: a.code,
      name: a.name,
      loinc: a.loinc,
      unit: a.unit,
      decimals: a.decimals,
      specimen: a.specimen,
      inForce: v
        ? {
            number: v.number,
            effectiveFrom: v.effectiveFrom ? formatDate(v.effectiveFrom) : null,
            partitions: v.partitions.map((p) => lmsScopeLabel(p) ?? patientScopeLabel(scopeLabel(p))),
            bySex: v.partitions.some((p) => p.sex !== null),
            byAge: v.partitions.some((p) => p.ageFromDays !== null || p.ageToDays !== null),
          }
        : null,
      unavailable: v ? null : noIntervalReason(s?.states ?? [], s?.withdrawnAt ? formatDate(s.withdrawnAt) : null),
    };
  });
  // Analytes that can be scored first, each group by name.
  analytes.sort((a, b) => Number(Boolean(a.unavailable)) - Number(Boolean(b.unavailable)) || a.name.localeCompare(b.name));
  const query = one(params.q).slice(0, 64);
  const asked = one(params.analyte).toUpperCase() || query.trim().toUpperCase();
  const preselected = analytes.find((a) => !a.unavailable && (a.code === asked || (query && a.loinc === query.trim())))?.code ?? null;
  const scorable = analytes.filter((a) => !a.unavailable).length;
  return (
    <>
      <PageHeader
        title="Score a patient value"
        lead={
          <>
            Places a value among healthy reference individuals with the laboratory&apos;s interval in force: the flag, the z-score
            and the percentile, with the cautions that go with them. Bellwether supports and does not replace the
            laboratory&apos;s licensed direction; a score is a statistic, not a diagnosis. The intervals themselves are in the{" "}
            <Link href="/intervals">register</Link>.
          </>
        }
      />
      {scorable === 0 ? (
        <div className="rounded-lg border border-dashed border-ink-300 bg-white px-4 py-6 text-sm text-ink-600 [&_a]:underline" data-testid="score-nothing-in-force">
          <p className="font-medium text-ink-900">No interval is in force yet, so nothing can be scored.</p>
          <p>
            {can(caller.role, "studies:write") ? (
              <>
                Intervals come into force when the director signs a version off: start from a <Link href="/studies">study</Link> or
                an <Link href="/adoption-checks">adoption check</Link>.
              </>
            ) : (
              <>Ask the laboratory when its first interval will be signed off; the <Link href="/intervals">register</Link> shows what is in force.</>
            )}
          </p>
        </div>
      ) : null}
      <ScoreWorkbench
        analytes={analytes}
        initialAnalyte={preselected}
        initialQuery={preselected ? "" : query}
        initialMode={one(params.mode) === "panel" ? "panel" : "single"}
      />
    </>
  );
}
