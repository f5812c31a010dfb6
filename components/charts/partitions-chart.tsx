"use client";

import type { ChartData, ChartOptions } from "chart.js";
import { Chart } from "react-chartjs-2";
import { formatCi, formatValue } from "@/lib/format";
import { AltTable, ChartFigure } from "./chart-figure";
import type { ChartLimits } from "./limit-annotations";
import { CHART_COLORS } from "./palette";
import { registerCharts } from "./setup";

registerCharts();

export interface PartitionLimits extends ChartLimits {
  label: string;
  method: string;
  n: number;
}

/**
 * The partitions' reference intervals side by side: one row per partition, the interval as a
 * slate bar, each limit as a teal mark inside its translucent 90% CI band.
 */
export function PartitionsChart({ rows, unit, decimals }: { rows: PartitionLimits[]; unit: string; decimals: number }) {
  const fmt = (v: number) => formatValue(v, decimals);
  const labels = rows.map((r) => `${r.label} (n ${r.n})`);
  const range = (a: number | null, b: number | null) => (a === null || b === null ? null : ([a, b] as [number, number]));
  const ends = rows
    .flatMap((r) => [r.lower, r.upper, ...(r.lowerCi ?? []), ...(r.upperCi ?? [])])
    .filter((v): v is number => v !== null && Number.isFinite(v));
  const lo = ends.length ? Math.min(...ends) : 0;
  const hi = ends.length ? Math.max(...ends) : 1;
  const pad = (hi - lo) * 0.08 || 1;
  const data: ChartData<"bar" | "scatter", unknown[]> = {
    labels,
    datasets: [
      {
        type: "bar",
        label: "Reference interval",
        data: rows.map((r) => range(r.lower, r.upper)),
        backgroundColor: "rgba(115, 131, 143, 0.18)",
        borderColor: CHART_COLORS.donor,
        borderWidth: 1,
        barPercentage: 0.35,
        grouped: false,
        order: 3,
      },
      {
        type: "bar",
        label: "90% CI of the lower limit",
        data: rows.map((r) => (r.lowerCi ? [r.lowerCi[0], r.lowerCi[1]] : null)),
        backgroundColor: CHART_COLORS.ciBand,
        borderColor: CHART_COLORS.ciBorder,
        borderWidth: 1,
        barPercentage: 0.7,
        grouped: false,
        order: 2,
      },
      {
        type: "bar",
        label: "90% CI of the upper limit",
        data: rows.map((r) => (r.upperCi ? [r.upperCi[0], r.upperCi[1]] : null)),
        backgroundColor: CHART_COLORS.ciBand,
        borderColor: CHART_COLORS.ciBorder,
        borderWidth: 1,
        barPercentage: 0.7,
        grouped: false,
        order: 2,
      },
      {
        type: "scatter",
        label: "Reference limits",
        data: rows.flatMap((r, i) =>
          [r.lower, r.upper].filter((v): v is number => v !== null).map((v) => ({ x: v, y: labels[i] })),
        ),
        pointStyle: "line",
        pointRotation: 90,
        pointRadius: 12,
        borderWidth: 3,
        borderColor: CHART_COLORS.limit,
        backgroundColor: CHART_COLORS.limit,
        order: 1,
      },
    ],
  };
  const options: ChartOptions<"bar"> = {
    indexAxis: "y",
    responsive: true,
    maintainAspectRatio: false,
    scales: {
      x: {
        type: "linear",
        beginAtZero: false,
        min: lo - pad,
        max: hi + pad,
        title: { display: true, text: `Value (${unit})` },
        ticks: { callback: (v) => fmt(Number(v)) },
        grid: { color: CHART_COLORS.grid },
      },
      y: { type: "category", grid: { display: false } },
    },
    plugins: {
      legend: { position: "bottom", labels: { boxWidth: 12 } },
      tooltip: {
        callbacks: {
          label: (item) => {
            const raw = item.raw as [number, number] | { x: number } | null;
            if (Array.isArray(raw)) return `${item.dataset.label}: ${fmt(raw[0])} – ${fmt(raw[1])}`;
            return raw ? `Limit: ${fmt(raw.x)}` : "";
          },
        },
      },
    },
  };
  return (
    <ChartFigure
      height={Math.max(140, 60 + rows.length * 48)}
      testId="partitions-chart"
      caption={`The reference limits of ${rows.length} partition${rows.length === 1 ? "" : "s"} side by side (${unit}), each limit inside its 90% CI band.`}
      alternative={
        <AltTable
          caption="Partitions compared"
          head={["Partition", "Method", "n", `Lower (${unit})`, "90% CI", `Upper (${unit})`, "90% CI"]}
          rows={rows.map((r) => [r.label, r.method, r.n, fmt(r.lower ?? NaN), formatCi(r.lowerCi, decimals), fmt(r.upper ?? NaN), formatCi(r.upperCi, decimals)])}
        />
      }
    >
      <Chart type="bar" data={data as ChartData<"bar">} options={options} />
    </ChartFigure>
  );
}
