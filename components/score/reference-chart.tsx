"use client";

import type { ChartData, ChartOptions } from "chart.js";
import type { AnnotationOptions } from "chartjs-plugin-annotation";
import { Chart } from "react-chartjs-2";
import { ChartFigure } from "@/components/charts/chart-figure";
import { CHART_COLORS } from "@/components/charts/palette";
import { registerCharts } from "@/components/charts/setup";
import { formatValue } from "@/lib/format";
import { ageWords } from "@/lib/scoring/lms-curves-view";
import { lmsAsGaussian, referenceCurve, shadedBelow, unitTicks, valueOfScale, type CurveModel } from "@/lib/scoring/reference-curve";
import type { ScoreResult } from "@/lib/scores/schemas";
import { percentileText, valueText } from "./words";

registerCharts();

const PATIENT = "#141b21";
const SHADE = "rgba(31, 122, 122, 0.22)";

/** The axis title: the scale the model works on, in words, and the unit the labels are in. */
function axisTitle(model: CurveModel, unit: string): string {
  if (model.kind !== "gaussian") return "z (standard normal scale); limits and value labelled in " + unit;
  if (model.transform === "ln") return `Value (${unit}), log scale`;
  if (model.transform === "box-cox") return `Value (${unit}), Box-Cox scale (λ = ${formatValue(model.lambda, 2)})`;
  return `Value (${unit})`;
}

function scaleWords(model: CurveModel): string {
  if (model.kind === "gaussian") {
    if (model.transform === "ln") return "fitted normal on the log scale";
    if (model.transform === "box-cox") return "fitted normal on the Box-Cox scale";
    return "fitted normal";
  }
  return model.kind === "zlog" ? "standard normal of the zlog method" : "standard normal, the reference values' ranks read as z";
}

/**
 * The reference distribution on the model's scale, the interval's limits labelled, the patient's
 * value as a dark labelled marker and the area below it shaded: the percentile (UX.md, Charts).
 * A limits-only interval has no distribution to draw, and the card says so instead.
 */
export function ReferenceChart({ result }: { result: ScoreResult }) {
  // LMS curves are, at the patient's age, a normal distribution on the Box-Cox scale with λ = L.
  const lms = result.model.kind === "lms" ? result.model : null;
  const model = (lms ? lmsAsGaussian(lms) : result.model) as CurveModel;
  const words = lms ? `the LMS age curves' distribution at ${ageWords(lms.ageYears)}, a normal on the Box-Cox scale with λ = L` : scaleWords(model);
  const { interval } = result;
  const unit = interval.unit;
  const fmt = (v: number | null) => formatValue(v, interval.decimals);
  const curve = referenceCurve(model, { low: interval.low, high: interval.high, z: result.z });
  if (!curve) {
    return (
      <p className="rounded-md border border-dashed border-ink-300 px-3 py-2 text-sm text-ink-600" data-testid="no-chart">
        No chart: this interval is known by its limits alone, so there is no distribution of healthy values to draw
        and no z-score or percentile, only the flag.
      </p>
    );
  }
  const percentile = percentileText(result.percentile, result.percentileBound);
  const shade = shadedBelow(curve);
  const peak = Math.max(...curve.points.map((p) => p.y));
  const data: ChartData<"line" | "scatter", { x: number; y: number }[]> = {
    datasets: [
      {
        type: "line",
        label: `Share below the value (percentile ${percentile})`,
        data: shade,
        borderWidth: 0,
        pointRadius: 0,
        fill: "origin",
        backgroundColor: SHADE,
        order: 3,
      },
      {
        type: "line",
        label: `Reference distribution (${lms ? `at ${ageWords(lms.ageYears)}` : words})`,
        data: curve.points,
        borderColor: CHART_COLORS.donorDark,
        borderWidth: 2,
        pointRadius: 0,
        order: 2,
      },
      ...(curve.value !== null
        ? [
            {
              type: "scatter" as const,
              label: "This value",
              data: [{ x: curve.value, y: 0 }],
              pointStyle: "rectRot",
              pointRadius: 8,
              backgroundColor: PATIENT,
              borderColor: "#ffffff",
              borderWidth: 1.5,
              order: 0,
            },
          ]
        : []),
    ],
  };
  const annotations: Record<string, AnnotationOptions> = {};
  for (const side of ["lower", "upper"] as const) {
    const at = curve[side];
    const limit = side === "lower" ? interval.low : interval.high;
    if (at === null || !Number.isFinite(at) || limit === null) continue;
    annotations[side] = {
      type: "line",
      xScaleID: "x",
      xMin: at,
      xMax: at,
      borderColor: CHART_COLORS.limit,
      borderWidth: 2,
      borderDash: [6, 4],
      label: {
        display: true,
        content: `${side === "lower" ? "Lower limit" : "Upper limit"} ${fmt(limit)}`,
        position: "start",
        backgroundColor: CHART_COLORS.limit,
        color: "#ffffff",
        font: { size: 11, weight: "bold" },
        padding: 3,
      },
    } as AnnotationOptions;
  }
  if (curve.value !== null) {
    annotations.value = {
      type: "line",
      xScaleID: "x",
      xMin: curve.value,
      xMax: curve.value,
      borderColor: PATIENT,
      borderWidth: 2.5,
      label: {
        display: true,
        content: `${curve.clamped ? "Value (off the chart) " : "Value "}${valueText(result)} ${unit}`,
        position: "center",
        backgroundColor: PATIENT,
        color: "#ffffff",
        font: { size: 11, weight: "bold" },
        padding: 4,
      },
    } as AnnotationOptions;
  }
  const ticks = model.kind === "gaussian" && model.transform !== "none" ? unitTicks(model, curve.min, curve.max, 6) : null;
  const inverse = model.kind === "gaussian" ? valueOfScale(model) : null;
  const options: ChartOptions<"line" | "scatter"> = {
    responsive: true,
    maintainAspectRatio: false,
    parsing: false,
    scales: {
      x: {
        type: "linear",
        min: curve.min,
        max: curve.max,
        title: { display: true, text: axisTitle(model, unit) },
        grid: { color: CHART_COLORS.grid },
        ...(ticks ? { afterBuildTicks: (scale: { ticks: { value: number }[] }) => void (scale.ticks = ticks.map((t) => ({ value: t.at }))) } : {}),
        ticks: {
          // The drawn range's own ends are not round numbers: no tick there.
          includeBounds: false,
          callback: (v) => {
            const n = Number(v);
            if (model.kind !== "gaussian") return Number.isInteger(n) ? String(n) : "";
            const raw = ticks ? ticks.find((t) => Math.abs(t.at - n) < 1e-9)?.value ?? inverse?.(n) ?? null : n;
            return raw === null ? "" : ticks ? String(raw) : fmt(raw);
          },
        },
      },
      y: { beginAtZero: true, max: peak * 1.12, title: { display: true, text: "Density" }, ticks: { display: false }, grid: { color: CHART_COLORS.grid } },
    },
    plugins: {
      legend: { position: "bottom", labels: { boxWidth: 12, usePointStyle: true } },
      tooltip: { enabled: false },
      annotation: { annotations },
    },
  };
  const caption =
    `The reference distribution of ${result.analyte.name} (${words}) with the interval's limits${lms ? " at that age" : ""}; the dark marker is this value ` +
    `and the shaded area the share of healthy reference individuals below it (percentile ${percentile}).`;
  return (
    <ChartFigure
      height={250}
      testId="reference-chart"
      caption={caption}
      alternative={
        <ul>
          <li>Chart axis: {axisTitle(model, unit)}.</li>
          <li>
            Interval: lower limit {fmt(interval.low)} {unit}, upper limit {fmt(interval.high)} {unit}.
          </li>
          <li>
            This value: {valueText(result)} {unit}, at percentile {percentile}
            {curve.clamped ? ", beyond the drawn range" : ""}.
          </li>
        </ul>
      }
    >
      <Chart type="line" data={data as unknown as ChartData<"line">} options={options as unknown as ChartOptions<"line">} />
    </ChartFigure>
  );
}
