import { SimpleTable } from "@/components/ui/simple-table";
import { formatValue } from "@/lib/format";
import { ageWords, lmsRows, lmsTableAges } from "@/lib/scoring/lms-curves-view";
import type { LmsModel } from "@/lib/scoring/model";

/**
 * The limits of LMS age curves at a table of ages (the curves' first and last age and round
 * ages between): what a laboratory files and prints, beside the chart. A dash where the curves
 * give no centile at that age (1 + L·S·z ≤ 0).
 */
export function LmsLimitsTable({ model, unit, decimals, label }: { model: LmsModel; unit: string; decimals: number; label: string }) {
  const rows = lmsRows(model, lmsTableAges(model));
  return (
    <SimpleTable
      caption={`${label}: limits at ages`}
      testId="lms-limits-table"
      head={["Age", `Lower limit (${unit})`, `Median (${unit})`, `Upper limit (${unit})`]}
      rows={rows.map((r) => [ageWords(r.ageYears), formatValue(r.low, decimals), formatValue(r.median, decimals), formatValue(r.high, decimals)])}
    />
  );
}
