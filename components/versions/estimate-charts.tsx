"use client";

import useSWR from "swr";
import { HistogramChart } from "@/components/charts/histogram-chart";
import { QqChart, scaleWords } from "@/components/charts/qq-chart";
import { fetchJson, studyApi } from "@/components/studies/analysis/api";
import type { EstimateChartData } from "@/components/studies/analysis/types";
import type { ChartLimits } from "@/components/charts/limit-annotations";

/**
 * The histogram with the fitted density and the Q-Q plot of the estimate behind one partition,
 * drawn with the limits this version carries, from the same chart-data route the study page uses.
 */
export function EstimateCharts({
  studyId,
  estimateId,
  limits,
  method,
  unit,
  decimals,
}: {
  studyId: string;
  estimateId: string;
  limits: ChartLimits;
  method: string;
  unit: string;
  decimals: number;
}) {
  const charts = useSWR<EstimateChartData>(`${studyApi(studyId)}/estimates/${encodeURIComponent(estimateId)}/chart-data`, fetchJson);
  if (charts.error) return <p className="text-sm text-signal-warn">The charts could not be loaded; reload the page, or open them on the study page.</p>;
  if (!charts.data) return <div className="h-56 animate-pulse rounded-md bg-ink-100" aria-label="Loading the charts" />;
  const data = charts.data;
  if (!data.histogram || !data.qq) return <p className="text-sm text-ink-600">Too few distinct measured values to draw the histogram and Q-Q plot.</p>;
  return (
    <div className="grid min-w-0 gap-4 lg:grid-cols-2">
      <HistogramChart
        bins={data.histogram.bins}
        curve={data.histogram.curve}
        limits={limits}
        limitsMethod={method}
        fitScale={scaleWords(data.scale)}
        unit={unit}
        decimals={decimals}
      />
      <QqChart points={data.qq.points} line={data.qq.line} scale={data.scale} n={data.n} thinned={data.qq.thinned} limits={limits} unit={unit} decimals={decimals} />
    </div>
  );
}
