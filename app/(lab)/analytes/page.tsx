import type { Metadata } from "next";
import { AnalyteCatalogue } from "@/components/analytes/analyte-catalogue";
import type { AnalyteRow } from "@/components/analytes/analyte-row";
import { PageHeader } from "@/components/ui/panel";
import { db } from "@/db/client";
import { listAnalytes, type Analyte } from "@/db/queries/analytes";
import { can } from "@/lib/auth/roles";
import { requirePageCaller } from "@/lib/auth/session";
import { createAnalyteAction, updateAnalyteAction } from "./actions";

export const metadata: Metadata = { title: "Analytes" };

function criticalLimits(a: Analyte): string {
  const f = (v: number) => v.toFixed(a.decimals);
  if (a.criticalLow !== null && a.criticalHigh !== null) return `${f(a.criticalLow)} – ${f(a.criticalHigh)}`;
  if (a.criticalLow !== null) return `< ${f(a.criticalLow)}`;
  if (a.criticalHigh !== null) return `> ${f(a.criticalHigh)}`;
  return "—";
}

const text = (v: number | string | null) => (v === null ? "" : String(v));

/**
 * The analyte catalogue. Scientists and directors keep it (it is in their navigation); clinicians
 * and administrators, who may read it over the API, may also open it here, read-only.
 */
export default async function AnalytesPage() {
  const caller = await requirePageCaller("intervals:read");
  const canWrite = can(caller.role, "analytes:write");
  const analytes = await listAnalytes(db());
  const rows: AnalyteRow[] = analytes.map((a) => ({
    code: a.code,
    name: a.name,
    unit: a.unit,
    decimals: a.decimals,
    loinc: a.loinc ?? "",
    specimen: a.specimen,
    criticalLimits: criticalLimits(a),
    reviewMonths: a.reviewMonths,
    values: {
      code: a.code,
      name: a.name,
      unit: a.unit,
      decimals: text(a.decimals),
      loinc: text(a.loinc),
      specimen: a.specimen,
      reviewMonths: text(a.reviewMonths),
      criticalLow: text(a.criticalLow),
      criticalHigh: text(a.criticalHigh),
      molarMass: text(a.molarMass),
      molarMassSource: text(a.molarMassSource),
    },
  }));
  return (
    <>
      <PageHeader
        title="Analytes"
        lead={
          canWrite
            ? "What the laboratory measures: our code, the UCUM unit and display decimals every limit is stated in, the LOINC code, the specimen, default critical limits and how often its interval is reviewed. Unit and decimals lock once an interval version of the analyte leaves draft."
            : "What the laboratory measures, in which unit and with which codes. Read-only: laboratory scientists and the director keep this catalogue."
        }
      />
      <AnalyteCatalogue rows={rows} actions={canWrite ? { create: createAnalyteAction, update: updateAnalyteAction } : undefined} />
    </>
  );
}
