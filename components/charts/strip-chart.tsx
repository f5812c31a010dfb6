"use client";

import type { ChartData, ChartOptions } from "chart.js";
import { Chart } from "react-chartjs-2";
import { formatValue } from "@/lib/format";
import { ChartFigure } from "./chart-figure";
import { CHART_COLORS } from "./palette";
import { registerCharts } from "./setup";

registerCharts();

export interface StripChartProps {
  /** The partition's measured values in rank order (possibly thinned by the server). */
  points: { rank: number; value: number }[];
  n: number;
  thinned: boolean;
  /** Values the screen proposed, each with the donor code it belongs to. */
  proposals: { donorCode: string; value: number; excluded?: boolean }[];
  unit: string;
  decimals: number;
  partitionWords: string;
  height?: number;
}

/** A deterministic spread in [−1, 1] so that equal values do not hide one another. */
function jitter(rank: number): number {
  const x = Math.sin(rank * 12.9898) * 43758.5453;
  return (x - Math.floor(x)) * 2 - 1;
}

/**
 * Every donor value of a partition as a dot on the value axis, the screen's proposals as amber
 * hollow triangles: where the proposals lie against the rest of the data.
 */
export function StripChart({ points, n, thinned, proposals, unit, decimals, partitionWords, height = 170 }: StripChartProps) {
  const fmt = (v: number) => formatValue(v, decimals);
  const data: ChartData<"scatter", { x: number; y: number }[]> = {
    datasets: [
      {
        label: "Donor values",
        data: points.map((p) => ({ x: p.value, y: jitter(p.rank) })),
        backgroundColor: CHART_COLORS.donorFill,
        borderColor: CHART_COLORS.donor,
        borderWidth: 0.5,
        pointRadius: points.length > 1000 ? 1.5 : 2.5,
      },
      {
        label: "Proposed outliers",
        data: proposals.map((p, i) => ({ x: p.value, y: jitter(i + 0.5) * 0.6 })),
        pointStyle: "triangle",
        pointRadius: 8,
        backgroundColor: "rgba(0,0,0,0)",
        borderColor: CHART_COLORS.outlier,
        borderWidth: 2,
      },
    ],
  };
  const options: ChartOptions<"scatter"> = {
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    scales: {
      x: { type: "linear", title: { display: true, text: `Value (${unit})` }, ticks: { callback: (v) => fmt(Number(v)) }, grid: { color: CHART_COLORS.grid } },
      y: { type: "linear", min: -1.5, max: 1.5, display: false },
    },
    plugins: {
      legend: { position: "bottom", labels: { boxWidth: 12, usePointStyle: true } },
      tooltip: { callbacks: { label: (item) => `${fmt(item.parsed.x ?? 0)} ${unit}` } },
    },
  };
  const shown = thinned ? `${points.length} of ${n} values (both tails in full)` : `all ${n} measured values`;
  return (
    <ChartFigure
      height={height}
      testId="strip-chart"
      caption={`${partitionWords}: ${shown} as dots; the screen's ${proposals.length} proposal${proposals.length === 1 ? "" : "s"} as amber hollow triangles.`}
      alternative={
        <ul aria-label="Proposed outliers">
          {proposals.length === 0 ? <li>The screen proposes no outlier.</li> : null}
          {proposals.map((p) => (
            <li key={`${p.donorCode}-${p.value}`}>
              Donor {p.donorCode}: {fmt(p.value)} {unit}
            </li>
          ))}
        </ul>
      }
    >
      <Chart type="scatter" data={data} options={options} />
    </ChartFigure>
  );
}
