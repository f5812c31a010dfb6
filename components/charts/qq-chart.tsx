"use client";

import type { ChartData, ChartOptions } from "chart.js";
import { Chart } from "react-chartjs-2";
import { formatValue, formatZ } from "@/lib/format";
import { boxCoxInverse, boxCoxOfValue } from "@/lib/stats/box-cox";
import { AltTable, ChartFigure } from "./chart-figure";
import { limitAnnotations, type ChartLimits } from "./limit-annotations";
import { CHART_COLORS } from "./palette";
import { registerCharts } from "./setup";

registerCharts();

export type ChartScale = { transform: "none" | "ln" | "box-cox"; lambda: number | null };

/** The scale in words for axis titles and captions. */
export function scaleWords(scale: ChartScale): string {
  if (scale.transform === "ln") return "ln scale";
  if (scale.transform === "box-cox") return `Box-Cox scale, λ = ${(scale.lambda ?? 0).toFixed(2)}`;
  return "raw scale";
}

function toScale(v: number, scale: ChartScale): number | null {
  if (scale.transform === "none") return v;
  if (!(v > 0)) return null;
  return boxCoxOfValue(v, scale.transform === "ln" ? 0 : (scale.lambda ?? 1));
}

function fromScale(y: number, scale: ChartScale): number | null {
  if (scale.transform === "none") return y;
  try {
    return boxCoxInverse(y, scale.transform === "ln" ? 0 : (scale.lambda ?? 1));
  } catch {
    return null;
  }
}

export interface QqChartProps {
  /** Points on the chosen scale: Blom scores against the sorted (transformed) values. */
  points: { theoretical: number; sample: number; rank: number }[];
  line: { intercept: number; slope: number };
  scale: ChartScale;
  /** Total measured values (the points may be thinned). */
  n: number;
  thinned: boolean;
  /** Limits on the raw scale; drawn where they fall on the chosen scale. */
  limits?: ChartLimits;
  unit: string;
  decimals: number;
  height?: number;
}

/**
 * Normal Q-Q plot on the model's scale: the value axis is that scale (labelled in the analyte's
 * unit), so a straight line means the fitted normal describes the values.
 */
export function QqChart({ points, line, scale, n, thinned, limits, unit, decimals, height }: QqChartProps) {
  const fmt = (v: number) => formatValue(v, decimals);
  const raw = (y: number) => {
    const v = fromScale(y, scale);
    return v === null ? "—" : fmt(v);
  };
  const zs = points.map((p) => p.theoretical);
  const zMin = Math.min(-3, ...zs);
  const zMax = Math.max(3, ...zs);
  const data: ChartData<"scatter" | "line", { x: number; y: number }[]> = {
    datasets: [
      {
        type: "scatter",
        label: "Donor values",
        data: points.map((p) => ({ x: p.theoretical, y: p.sample })),
        backgroundColor: CHART_COLORS.donorFill,
        borderColor: CHART_COLORS.donor,
        pointRadius: points.length > 300 ? 2 : 3,
      },
      {
        type: "line",
        label: "Fitted normal (mean, SD)",
        data: [
          { x: zMin, y: line.intercept + line.slope * zMin },
          { x: zMax, y: line.intercept + line.slope * zMax },
        ],
        borderColor: CHART_COLORS.fit,
        borderDash: [6, 4],
        borderWidth: 1.5,
        pointRadius: 0,
      },
    ],
  };
  const onScale = (v: number | null) => (v === null ? null : toScale(v, scale));
  const scaled: ChartLimits | null = limits
    ? {
        lower: onScale(limits.lower),
        upper: onScale(limits.upper),
        lowerCi: null,
        upperCi: null,
      }
    : null;
  const annotations = scaled ? limitAnnotations(scaled, (y) => raw(y), "y") : {};
  const axisTitle = scale.transform === "none" ? `Value (${unit})` : `Value (${unit}), ${scaleWords(scale)}`;
  const options: ChartOptions<"scatter" | "line"> = {
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    scales: {
      x: { type: "linear", title: { display: true, text: "Normal score (z)" }, grid: { color: CHART_COLORS.grid } },
      y: {
        type: "linear",
        title: { display: true, text: axisTitle },
        ticks: { callback: (v) => raw(Number(v)) },
        grid: { color: CHART_COLORS.grid },
      },
    },
    plugins: {
      legend: { position: "bottom", labels: { boxWidth: 12, usePointStyle: true } },
      tooltip: {
        callbacks: { label: (item) => `z ${formatZ(item.parsed.x)}: ${raw(item.parsed.y ?? 0)} ${unit}` },
      },
      annotation: { annotations },
    },
  };
  const shown = thinned ? `${points.length} of ${n} values (both tails in full)` : `${n} values`;
  return (
    <ChartFigure
      height={height}
      testId="qq-chart"
      caption={`Normal Q-Q plot of ${shown} on the ${scaleWords(scale)}: points on the dashed line follow the fitted normal.`}
      alternative={
        <AltTable
          caption={`Normal Q-Q plot on the ${scaleWords(scale)}`}
          head={["Rank", "Normal score (z)", `Value (${unit})`]}
          rows={points.map((p) => [p.rank, formatZ(p.theoretical), raw(p.sample)])}
        />
      }
    >
      <Chart type="scatter" data={data as unknown as ChartData<"scatter">} options={options as unknown as ChartOptions<"scatter">} />
    </ChartFigure>
  );
}
