"use client";

import type { ChartData, ChartOptions } from "chart.js";
import { Chart } from "react-chartjs-2";
import { formatValue, formatZ } from "@/lib/format";
import { AltTable, ChartFigure } from "./chart-figure";
import { CHART_COLORS } from "./palette";
import { registerCharts } from "./setup";

registerCharts();

export interface CentilePoint {
  age: number;
  lower: number | null;
  median: number;
  upper: number | null;
}

export interface CentileDonor {
  id: number;
  donorCode: string;
  age: number;
  value: number;
  z: number;
}

export interface CentileChartProps {
  curves: CentilePoint[];
  donors: CentileDonor[];
  /** Donors fitted (the points may be thinned). */
  n: number;
  thinned: boolean;
  unit: string;
  decimals: number;
  height?: number;
}

/** Beyond this |z| a donor is drawn as a possible outlier (amber, hollow). */
const FAR_Z = 4;

const age = (a: number) => (a < 2 ? `${(a * 12).toFixed(1)} months` : `${a.toFixed(1)} years`);

/**
 * LMS centile curves over the donors they were fitted to: the 2.5th and 97.5th centiles teal
 * (the reference limits, labelled in the legend), the 50th dashed, the donors slate points and
 * those beyond 4 SD amber hollow markers. Age in years on a linear axis.
 */
export function CentileChart({ curves, donors, n, thinned, unit, decimals, height = 340 }: CentileChartProps) {
  const fmt = (v: number | null) => formatValue(v, decimals);
  const near = donors.filter((d) => Math.abs(d.z) <= FAR_Z);
  const far = donors.filter((d) => Math.abs(d.z) > FAR_Z);
  const line = (pick: (p: CentilePoint) => number | null) =>
    curves.filter((p) => pick(p) !== null).map((p) => ({ x: p.age, y: pick(p) as number }));
  const data: ChartData<"scatter" | "line", { x: number; y: number }[]> = {
    datasets: [
      {
        type: "scatter",
        label: "Donors",
        data: near.map((d) => ({ x: d.age, y: d.value })),
        backgroundColor: CHART_COLORS.donorFill,
        borderColor: CHART_COLORS.donor,
        pointRadius: donors.length > 800 ? 1.5 : 2.5,
        order: 3,
      },
      {
        type: "scatter",
        label: `Donors beyond ${FAR_Z} SD (possible outliers)`,
        data: far.map((d) => ({ x: d.age, y: d.value })),
        backgroundColor: "rgba(255,255,255,0)",
        borderColor: CHART_COLORS.outlier,
        pointStyle: "rectRot",
        pointRadius: 4,
        borderWidth: 1.5,
        order: 2,
      },
      { type: "line", label: "97.5th centile (upper limit)", data: line((p) => p.upper), borderColor: CHART_COLORS.limit, borderWidth: 2, pointRadius: 0, order: 1 },
      { type: "line", label: "50th centile (median)", data: line((p) => p.median), borderColor: CHART_COLORS.fit, borderDash: [6, 4], borderWidth: 1.5, pointRadius: 0, order: 1 },
      { type: "line", label: "2.5th centile (lower limit)", data: line((p) => p.lower), borderColor: CHART_COLORS.limit, borderWidth: 2, pointRadius: 0, order: 1 },
    ],
  };
  const options: ChartOptions<"scatter" | "line"> = {
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    animation: false,
    scales: {
      x: { type: "linear", title: { display: true, text: "Age (years)" }, grid: { color: CHART_COLORS.grid } },
      y: { type: "linear", title: { display: true, text: `Value (${unit})` }, ticks: { callback: (v) => fmt(Number(v)) }, grid: { color: CHART_COLORS.grid } },
    },
    plugins: {
      legend: { position: "bottom", labels: { boxWidth: 12, usePointStyle: true } },
      tooltip: {
        callbacks: {
          label: (item) => {
            if (item.dataset.type === "line") return `${item.dataset.label}: ${fmt(item.parsed.y)} ${unit} at ${age(item.parsed.x ?? 0)}`;
            const d = (item.datasetIndex === 0 ? near : far)[item.dataIndex];
            return d ? `${d.donorCode}: ${fmt(d.value)} ${unit} at ${age(d.age)}, z ${formatZ(d.z)}` : "";
          },
        },
      },
    },
  };
  const shown = thinned ? `${donors.length} of ${n} donors, spread evenly over age` : `${n} donors`;
  const table = curves.filter((_, i) => i % 10 === 0 || i === curves.length - 1);
  return (
    <ChartFigure
      height={height}
      testId="centile-chart"
      caption={`The 2.5th, 50th and 97.5th centile curves fitted by LMS, over ${shown}; amber hollow diamonds lie more than ${FAR_Z} SD from the median.`}
      alternative={
        <AltTable
          caption={`Centile curves (${unit}) by age`}
          head={["Age (years)", "2.5th centile", "50th centile", "97.5th centile"]}
          rows={table.map((p) => [p.age.toFixed(2), fmt(p.lower), fmt(p.median), fmt(p.upper)])}
        />
      }
    >
      <Chart type="scatter" data={data as unknown as ChartData<"scatter">} options={options as unknown as ChartOptions<"scatter">} />
    </ChartFigure>
  );
}
