import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { VersionCard } from "@/components/intervals/version-card";
import { PageHeader } from "@/components/ui/panel";
import { db } from "@/db/client";
import { findAnalyteByCode } from "@/db/queries/analytes";
import { listAnalyteVersionStates } from "@/db/queries/intervals";
import { listIntervalVersions } from "@/db/queries/interval-versions";
import { analyteCodeSchema } from "@/lib/analytes/input";
import { can } from "@/lib/auth/roles";
import { requirePageCaller } from "@/lib/auth/session";
import { formatDate } from "@/lib/format";
import { noIntervalReason } from "@/lib/versions/availability";
import { versionView } from "../view";

export const metadata: Metadata = { title: "Interval" };

/**
 * One analyte's interval: for the laboratory's scientists and director the history of every
 * version, newest first; for clinicians and administrators only the version in force.
 */
export default async function AnalyteIntervalsPage({ params }: { params: Promise<{ code: string }> }) {
  const caller = await requirePageCaller("intervals:read");
  const { code: raw } = await params;
  const parsed = analyteCodeSchema.safeParse(decodeURIComponent(raw).toUpperCase());
  if (!parsed.success) notFound();
  const database = db();
  const analyte = await findAnalyteByCode(database, { code: parsed.data });
  if (!analyte) notFound();
  const lab = can(caller.role, "studies:write");
  const versions = await listIntervalVersions(database, { query: lab ? { analyte: analyte.code } : { analyte: analyte.code, state: "in_force" } });
  const now = new Date();
  const inForce = versions.find((v) => v.state === "in_force");
  let reason: string | null = null;
  if (!inForce) {
    const states = (await listAnalyteVersionStates(database)).find((s) => s.code === analyte.code);
    reason = noIntervalReason(states?.states ?? [], states?.withdrawnAt ? formatDate(states.withdrawnAt) : null);
  }
  return (
    <>
      <PageHeader
        title={`${analyte.name} (${analyte.code})`}
        lead={
          <>
            {analyte.loinc ? `LOINC ${analyte.loinc} · ` : ""}
            {analyte.specimen} · limits in {analyte.unit}.{" "}
            {lab
              ? "Every interval version of the analyte, newest first."
              : "The interval in force; earlier versions are kept by the laboratory."}{" "}
            <Link href="/intervals">Back to the register</Link>
            {inForce ? (
              <>
                {" · "}
                <Link href={`/score?analyte=${analyte.code}`}>Score a value</Link>
              </>
            ) : null}
          </>
        }
      />
      <div className="space-y-4" data-testid="version-history">
        {reason ? (
          <p className="rounded-md border border-dashed border-ink-300 bg-white px-4 py-3 text-sm text-ink-700" data-testid="no-interval">
            {reason}
          </p>
        ) : null}
        {versions.map((v) => (
          <VersionCard key={v.id} version={versionView(v, now)} unit={v.unit} reviewHref={lab ? `/versions/${v.id}` : undefined} />
        ))}
      </div>
    </>
  );
}
