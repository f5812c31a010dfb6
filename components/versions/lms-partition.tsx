import { lmsModelOf, lmsScopeLabel } from "@/lib/scoring/lms-curves-view";
import { LmsCurvesChart } from "./lms-curves-chart";
import { LmsLimitsTable } from "./lms-limits-table";

/**
 * Every partition of LMS age curves in a version: who it applies to and n, the centile curves
 * over age, and the limits at a table of ages. Nothing for a version without curves.
 */
export function LmsPartitionsCurves({
  partitions,
  unit,
  decimals,
  chart = true,
}: {
  partitions: readonly { id?: string; sex: "F" | "M" | null; n: number; model: unknown }[];
  unit: string;
  decimals: number;
  /** False where a chart cannot be drawn (the printed record keeps the table). */
  chart?: boolean;
}) {
  const curves = partitions.flatMap((p, i) => {
    const model = lmsModelOf(p.model);
    return model ? [{ key: p.id ?? String(i), model, n: p.n, label: lmsScopeLabel(p) as string }] : [];
  });
  if (curves.length === 0) return null;
  return (
    <div className="space-y-4" data-testid="lms-partitions">
      {curves.map((c) => (
        <div key={c.key} className="space-y-2">
          <h3 className="text-sm font-semibold text-ink-800">
            {c.label} · n = {c.n.toLocaleString("en")}
          </h3>
          <p className="text-sm text-ink-700">
            The limits follow the patient&apos;s exact age: at each age they are the 2.5th and 97.5th centiles of the curves. Ages
            outside the curves are not scored.
          </p>
          {chart ? <LmsCurvesChart model={c.model} unit={unit} decimals={decimals} label={c.label} /> : null}
          <LmsLimitsTable model={c.model} unit={unit} decimals={decimals} label={c.label} />
        </div>
      ))}
    </div>
  );
}
