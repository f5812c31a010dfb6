"use client";

import type { ChartData, ChartOptions } from "chart.js";
import { Chart } from "react-chartjs-2";
import { formatValue } from "@/lib/format";
import { AltTable, ChartFigure } from "./chart-figure";
import { limitAnnotations, type ChartLimits } from "./limit-annotations";
import { CHART_COLORS } from "./palette";
import { registerCharts } from "./setup";

registerCharts();

export interface IndirectChartBin {
  lower: number;
  upper: number | null;
  count: number;
  expectedNonDiseased: number;
  open: boolean;
}

export interface IndirectChartProps {
  bins: IndirectChartBin[];
  /** The truncation interval the fit used, [a, b]. */
  truncation: [number, number];
  /** The estimated non-diseased share, 0–1. */
  fraction: number;
  limits: ChartLimits;
  unit: string;
  decimals: number;
  height?: number;
}

/** The right end of the drawn axis: the wider of three times the upper limit and the truncation's end, so that a long diseased tail does not squash the rest. */
function axisEnd(bins: IndirectChartBin[], limits: ChartLimits, truncation: [number, number]): number {
  const lastEdge = bins.reduce((m, b) => (b.upper !== null ? Math.max(m, b.upper) : m), 0);
  const reach = Math.max(truncation[1] * 1.6, (limits.upperCi?.[1] ?? limits.upper ?? truncation[1]) * 1.6);
  return Math.min(lastEdge, reach);
}

/**
 * All routine results as a histogram, the fitted non-diseased distribution scaled by its
 * fraction (what the fit expects in each cell), the truncation interval the fit used, and the
 * limits with their 90% CI bands. The excess of the bars over the curve is what the method
 * takes for disease.
 */
export function IndirectChart({ bins, truncation, fraction, limits, unit, decimals, height }: IndirectChartProps) {
  const fmt = (v: number) => formatValue(v, decimals);
  const end = axisEnd(bins, limits, truncation);
  const closed = bins.filter((b) => !b.open && b.upper !== null);
  const drawn = closed.filter((b) => (b.upper as number) <= end);
  const beyond = bins.filter((b) => b.upper === null || b.lower >= end).reduce((s, b) => s + b.count, 0);
  const openBelow = bins.filter((b) => b.open && b.lower === 0).reduce((s, b) => s + b.count, 0);
  const n = bins.reduce((s, b) => s + b.count, 0);
  const data: ChartData<"bar" | "line", { x: number; y: number }[]> = {
    datasets: [
      {
        type: "bar",
        label: "All results (count per cell)",
        data: drawn.map((b) => ({ x: (b.lower + (b.upper as number)) / 2, y: b.count })),
        backgroundColor: CHART_COLORS.donorFill,
        borderColor: CHART_COLORS.donor,
        borderWidth: 0.5,
        barPercentage: 1,
        categoryPercentage: 1,
        grouped: false,
        order: 3,
      },
      {
        type: "line",
        label: `Fitted non-diseased part (${(fraction * 100).toFixed(1)}% of all)`,
        data: drawn.map((b) => ({ x: (b.lower + (b.upper as number)) / 2, y: b.expectedNonDiseased })),
        borderColor: CHART_COLORS.fit,
        borderWidth: 2,
        pointRadius: 0,
        tension: 0.2,
        order: 1,
      },
    ],
  };
  const start = drawn.length > 0 ? drawn[0].lower : 0;
  const options: ChartOptions<"bar" | "line"> = {
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    scales: {
      x: {
        type: "linear",
        min: start,
        max: end,
        title: { display: true, text: `Value (${unit})` },
        ticks: { callback: (v) => fmt(Number(v)) },
        grid: { color: CHART_COLORS.grid },
      },
      y: { beginAtZero: true, title: { display: true, text: "Results" }, grid: { color: CHART_COLORS.grid }, ticks: { precision: 0 } },
    },
    plugins: {
      legend: { position: "bottom", labels: { boxWidth: 12, usePointStyle: true } },
      tooltip: { callbacks: { title: (items) => (items[0] ? `${fmt(items[0].parsed.x ?? 0)} ${unit}` : "") } },
      annotation: {
        annotations: {
          truncation: {
            type: "box",
            xMin: truncation[0],
            xMax: truncation[1],
            backgroundColor: "rgba(17, 79, 79, 0.05)",
            borderColor: CHART_COLORS.fit,
            borderWidth: 1,
            borderDash: [4, 3],
            label: { display: true, content: "Truncation interval", position: { x: "center", y: "start" }, color: CHART_COLORS.fit, font: { size: 10 } },
          },
          ...limitAnnotations(limits, fmt),
        },
      },
    },
  };
  const notes = [
    openBelow > 0 ? `${openBelow} censored below the measuring range (not drawn)` : null,
    beyond > 0 ? `${beyond} above ${fmt(end)} ${unit} (not drawn)` : null,
  ].filter(Boolean);
  return (
    <ChartFigure
      height={height}
      testId="indirect-chart"
      caption={`Histogram of all ${n.toLocaleString("en")} results (${unit}) with the fitted non-diseased distribution scaled by its fraction, the truncation interval ${fmt(truncation[0])}–${fmt(truncation[1])}, and the limits with their 90% CI bands${notes.length ? `; ${notes.join("; ")}` : ""}.`}
      alternative={
        <AltTable
          caption={`Results per cell (${unit}) and the non-diseased count the fit expects; limits ${fmt(limits.lower ?? NaN)} and ${fmt(limits.upper ?? NaN)}`}
          head={[`From (${unit})`, `To (${unit})`, "Results", "Expected non-diseased"]}
          rows={bins.map((b) => [fmt(b.lower), b.upper === null ? "—" : fmt(b.upper), b.count, b.expectedNonDiseased.toFixed(1)])}
        />
      }
    >
      <Chart type="bar" data={data as unknown as ChartData<"bar">} options={options as unknown as ChartOptions<"bar">} />
    </ChartFigure>
  );
}
