"use client";

import type { ChartData, ChartOptions } from "chart.js";
import { Line } from "react-chartjs-2";
import { AltTable, ChartFigure } from "@/components/charts/chart-figure";
import { CHART_COLORS } from "@/components/charts/palette";
import { registerCharts } from "@/components/charts/setup";
import { formatValue } from "@/lib/format";
import { lmsCurvePoints, lmsRows, lmsTableAges } from "@/lib/scoring/lms-curves-view";
import type { LmsModel } from "@/lib/scoring/model";

registerCharts();

/**
 * A partition's LMS age curves: the 2.5th, 50th and 97.5th centiles over the ages they cover
 * (limits teal, the median dark), with the limits table as the screen-reader alternative. No
 * donor values: the curves alone, so every role that reads intervals may see it.
 */
export function LmsCurvesChart({ model, unit, decimals, label, height = 240 }: { model: LmsModel; unit: string; decimals: number; label: string; height?: number }) {
  const points = lmsCurvePoints(model);
  const line = (key: "low" | "median" | "high") =>
    points.flatMap((r) => (r[key] === null ? [] : [{ x: r.ageYears, y: r[key] as number }]));
  const data: ChartData<"line", { x: number; y: number }[]> = {
    datasets: [
      { label: "97.5th centile (upper limit)", data: line("high"), borderColor: CHART_COLORS.limit, borderWidth: 2, pointRadius: 0, borderDash: [6, 3] },
      { label: "Median", data: line("median"), borderColor: CHART_COLORS.donorDark, borderWidth: 2, pointRadius: 0 },
      { label: "2.5th centile (lower limit)", data: line("low"), borderColor: CHART_COLORS.limit, borderWidth: 2, pointRadius: 0 },
    ],
  };
  const options: ChartOptions<"line"> = {
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    scales: {
      x: { type: "linear", min: model.ageMin, max: model.ageMax, title: { display: true, text: "Age (years)" }, grid: { color: CHART_COLORS.grid } },
      y: { title: { display: true, text: `Value (${unit})` }, grid: { color: CHART_COLORS.grid }, ticks: { callback: (v) => formatValue(Number(v), decimals) } },
    },
    plugins: { legend: { position: "bottom", labels: { boxWidth: 12 } }, tooltip: { enabled: false } },
  };
  const rows = lmsRows(model, lmsTableAges(model));
  return (
    <ChartFigure
      height={height}
      testId="lms-curves-chart"
      caption={`${label}: the reference limits (2.5th and 97.5th centiles, teal) and the median over age, from the LMS age curves.`}
      alternative={
        <AltTable
          caption={`${label}: limits at ages`}
          head={["Age (years)", `Lower limit (${unit})`, `Median (${unit})`, `Upper limit (${unit})`]}
          rows={rows.map((r) => [String(Math.round(r.ageYears * 100) / 100), formatValue(r.low, decimals), formatValue(r.median, decimals), formatValue(r.high, decimals)])}
        />
      }
    >
      <Line data={data} options={options} />
    </ChartFigure>
  );
}
