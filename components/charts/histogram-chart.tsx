"use client";

import type { ChartData, ChartOptions } from "chart.js";
import { Chart } from "react-chartjs-2";
import { formatValue } from "@/lib/format";
import { AltTable, ChartFigure } from "./chart-figure";
import { limitAnnotations, type ChartLimits } from "./limit-annotations";
import { CHART_COLORS } from "./palette";
import { registerCharts } from "./setup";

registerCharts();

export interface HistogramChartProps {
  bins: { lower: number; upper: number; count: number; expected: number }[];
  /** The fitted density on the raw scale, scaled to counts. */
  curve: { x: number; y: number }[];
  limits: ChartLimits;
  /** Which method's limits are drawn, in words ("nonparametric"). */
  limitsMethod: string;
  /** The scale the normal was fitted on, in words ("ln scale", "Box-Cox scale, λ = 0.35"). */
  fitScale: string;
  unit: string;
  decimals: number;
  /** Values the screen proposed as outliers, marked on the axis. */
  proposed?: number[];
  height?: number;
}

/**
 * The donor values as a histogram with the normal density fitted on the model's scale, the
 * reference limits and their 90% CI bands.
 */
export function HistogramChart({ bins, curve, limits, limitsMethod, fitScale, unit, decimals, proposed = [], height }: HistogramChartProps) {
  const fmt = (v: number) => formatValue(v, decimals);
  const n = bins.reduce((s, b) => s + b.count, 0);
  const data: ChartData<"bar" | "line" | "scatter", { x: number; y: number }[]> = {
    datasets: [
      {
        type: "bar",
        label: "Donor values (count per bin)",
        data: bins.map((b) => ({ x: (b.lower + b.upper) / 2, y: b.count })),
        backgroundColor: CHART_COLORS.donorFill,
        borderColor: CHART_COLORS.donor,
        borderWidth: 1,
        barPercentage: 1,
        categoryPercentage: 1,
        grouped: false,
        order: 3,
      },
      {
        type: "line",
        label: `Fitted normal (${fitScale})`,
        data: curve,
        borderColor: CHART_COLORS.fit,
        borderWidth: 2,
        pointRadius: 0,
        tension: 0.2,
        order: 1,
      },
      ...(proposed.length > 0
        ? [
            {
              type: "scatter" as const,
              label: "Proposed outliers",
              data: proposed.map((v) => ({ x: v, y: 0 })),
              pointStyle: "triangle",
              pointRadius: 7,
              backgroundColor: "rgba(0,0,0,0)",
              borderColor: CHART_COLORS.outlier,
              borderWidth: 2,
              order: 0,
            },
          ]
        : []),
    ],
  };
  const lo = bins.length ? bins[0].lower : 0;
  const hi = bins.length ? bins[bins.length - 1].upper : 1;
  const extra = [limits.lower, limits.upper, ...(limits.lowerCi ?? []), ...(limits.upperCi ?? []), ...proposed].filter(
    (v): v is number => v !== null && Number.isFinite(v),
  );
  const min = Math.min(lo, ...extra);
  const max = Math.max(hi, ...extra);
  const pad = (max - min) * 0.03;
  const options: ChartOptions<"bar" | "line" | "scatter"> = {
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    scales: {
      x: {
        type: "linear",
        min: min - pad,
        max: max + pad,
        title: { display: true, text: `Value (${unit})` },
        ticks: { callback: (v) => fmt(Number(v)) },
        grid: { color: CHART_COLORS.grid },
      },
      y: { beginAtZero: true, title: { display: true, text: "Donors" }, grid: { color: CHART_COLORS.grid }, ticks: { precision: 0 } },
    },
    plugins: {
      legend: { position: "bottom", labels: { boxWidth: 12, usePointStyle: true } },
      tooltip: { callbacks: { title: (items) => (items[0] ? `${fmt(items[0].parsed.x ?? 0)} ${unit}` : "") } },
      annotation: { annotations: limitAnnotations(limits, fmt) },
    },
  };
  return (
    <ChartFigure
      height={height}
      testId="histogram-chart"
      caption={`Histogram of ${n} measured values (${unit}) with the normal fitted on the ${fitScale}, and the ${limitsMethod} limits with their 90% CI bands.`}
      alternative={
        <AltTable
          caption={`Histogram: donors per bin (${unit}); ${limitsMethod} limits ${fmt(limits.lower ?? NaN)} and ${fmt(limits.upper ?? NaN)}`}
          head={[`From (${unit})`, `To (${unit})`, "Donors", "Expected under the fitted normal"]}
          rows={bins.map((b) => [fmt(b.lower), fmt(b.upper), b.count, b.expected.toFixed(1)])}
        />
      }
    >
      <Chart type="bar" data={data as unknown as ChartData<"bar">} options={options as unknown as ChartOptions<"bar">} />
    </ChartFigure>
  );
}
