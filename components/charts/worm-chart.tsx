"use client";

import type { ChartData, ChartOptions } from "chart.js";
import { Chart } from "react-chartjs-2";
import { formatZ } from "@/lib/format";
import { AltTable, ChartFigure } from "./chart-figure";
import { CHART_COLORS } from "./palette";
import { registerCharts } from "./setup";

registerCharts();

export interface WormPoint {
  theoretical: number;
  z: number;
  worm: number;
}

/**
 * One age group's detrended normal Q-Q plot of the donors' z (the worm plot of van Buuren & Fredriks,
 * Stat Med 2001;20:1259–1277): z minus its normal score against the normal score. A flat worm on
 * the zero line means the curves describe the group; a slope, a U or an offset says how they miss.
 */
export function WormChart({ title, points, height = 150 }: { title: string; points: WormPoint[]; height?: number }) {
  const xs = points.map((p) => p.theoretical);
  const xMin = Math.min(-3, ...xs);
  const xMax = Math.max(3, ...xs);
  const data: ChartData<"scatter" | "line", { x: number; y: number }[]> = {
    datasets: [
      {
        type: "scatter",
        label: "Donors",
        data: points.map((p) => ({ x: p.theoretical, y: p.worm })),
        backgroundColor: CHART_COLORS.donorFill,
        borderColor: CHART_COLORS.donor,
        pointRadius: 2.5,
      },
      {
        type: "line",
        label: "Perfect fit",
        data: [
          { x: xMin, y: 0 },
          { x: xMax, y: 0 },
        ],
        borderColor: CHART_COLORS.fit,
        borderDash: [6, 4],
        borderWidth: 1,
        pointRadius: 0,
      },
    ],
  };
  const options: ChartOptions<"scatter" | "line"> = {
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    animation: false,
    scales: {
      x: { type: "linear", min: xMin, max: xMax, title: { display: true, text: "Normal score" }, grid: { color: CHART_COLORS.grid } },
      y: { type: "linear", suggestedMin: -0.6, suggestedMax: 0.6, title: { display: true, text: "z − normal score" }, grid: { color: CHART_COLORS.grid } },
    },
    plugins: { legend: { display: false } },
  };
  return (
    <div className="min-w-0 space-y-1">
      <p className="text-xs font-medium text-ink-700">{title}</p>
      <ChartFigure
      height={height}
      testId="worm-chart"
      caption={`${title}: detrended Q-Q of z (worm plot); points near the dashed zero line mean the curves fit this age group.`}
      alternative={
        <AltTable caption={`Worm plot, ${title}`} head={["Normal score", "z", "z − normal score"]} rows={points.map((p) => [formatZ(p.theoretical), formatZ(p.z), formatZ(p.worm)])} />
      }
    >
      <Chart type="scatter" data={data as unknown as ChartData<"scatter">} options={options as unknown as ChartOptions<"scatter">} />
    </ChartFigure>
    </div>
  );
}
