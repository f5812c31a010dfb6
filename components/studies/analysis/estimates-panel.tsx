"use client";

import { useState, type FormEvent } from "react";
import useSWR from "swr";
import { HistogramChart } from "@/components/charts/histogram-chart";
import { PartitionsChart } from "@/components/charts/partitions-chart";
import { QqChart, scaleWords } from "@/components/charts/qq-chart";
import { Button } from "@/components/ui/button";
import { formatCi, formatIsoDate, formatP, formatValue } from "@/lib/format";
import { ROBUST_MAX_N, ROBUST_MIN_N } from "@/lib/stats/robust-horn";
import { fetchJson, sendJson, studyApi } from "./api";
import { AnalysisSection, EmptyState, ErrorNotice, inputClass, labelClass, type SectionState, Skeleton, tableClass, tdClass, thClass } from "./feedback";
import { cleanPartition, partitionKey, partitionLabel } from "./partitions";
import type {
  EstimateChartData,
  EstimateDocument,
  EstimateListItem,
  EstimateMethod,
  OutlierOptionValue,
  Partition,
  SectionAnalyte,
  SectionProps,
  TransformOptionValue,
} from "./types";
import { hasLimits, METHOD_WORDS, useEstimates } from "./use-estimates";

const OUTLIER_CHOICES: { value: OutlierOptionValue; label: string }[] = [
  { value: "horn", label: "Horn (proposals listed)" },
  { value: "dixon", label: "Dixon/Reed (proposals listed)" },
  { value: "tukey", label: "Tukey (proposals listed)" },
  { value: "none", label: "None" },
];
const TRANSFORM_CHOICES: { value: TransformOptionValue; label: string }[] = [
  { value: "auto", label: "Automatic (LR tests)" },
  { value: "none", label: "Raw" },
  { value: "ln", label: "ln" },
  { value: "box-cox", label: "Box-Cox" },
];
const METHODS: EstimateMethod[] = ["nonparametric", "parametric", "robust"];

/** Estimates: for each partition, options → estimate; methods side by side, charts beside them. */
export function EstimatesPanel({ study: initial, analyte }: SectionProps) {
  const { study, plan, partitions, latest, estimates } = useEstimates(initial);
  const closed = study.status === "closed";
  const done = partitions.filter((p) => latest.has(partitionKey(p))).length;
  const compared = partitions
    .map((p) => ({ p, e: latest.get(partitionKey(p)) }))
    .filter((x): x is { p: Partition; e: EstimateListItem } => !!x.e);
  const state: SectionState = {
    done: `${done} of ${partitions.length} partition${partitions.length === 1 ? "" : "s"} estimated${plan ? "" : " (no partitions chosen: one interval for all donors)"}.`,
    next: done < partitions.length ? "Estimate each partition with the options below." : "Draft an interval version in step 5.",
  };
  return (
    <AnalysisSection id="estimates" title="Estimates" step={4} state={state}>
      {estimates.error ? <ErrorNotice error={estimates.error} action="The estimates could not be loaded" /> : null}
      {estimates.isLoading ? <Skeleton chart lines={4} label="Loading the estimates" /> : null}
      {estimates.data
        ? partitions.map((p) => (
            <PartitionEstimate
              key={partitionKey(p)}
              partition={p}
              latest={latest.get(partitionKey(p)) ?? null}
              api={studyApi(study.id)}
              analyte={analyte}
              closed={closed}
              onEstimated={() => estimates.mutate()}
            />
          ))
        : null}
      {compared.length > 1 ? (
        <div className="space-y-2">
          <h3 className="text-sm font-semibold text-ink-800">Partitions compared</h3>
          <PartitionsChart
            unit={analyte.unit}
            decimals={analyte.decimals}
            rows={compared.map(({ p, e }) => {
              const method: EstimateMethod = e.recommended ?? "nonparametric";
              const l = e[method];
              return { label: partitionLabel(p), method: `${METHOD_WORDS[method]}${e.recommended ? " (recommended)" : ""}`, n: e.n, lower: l.lower, upper: l.upper, lowerCi: l.lowerCi, upperCi: l.upperCi };
            })}
          />
        </div>
      ) : null}
    </AnalysisSection>
  );
}

function PartitionEstimate({
  partition,
  latest,
  api,
  analyte,
  closed,
  onEstimated,
}: {
  partition: Partition;
  latest: EstimateListItem | null;
  api: string;
  analyte: SectionAnalyte;
  closed: boolean;
  onEstimated: () => void;
}) {
  const label = partitionLabel(partition);
  const [outliers, setOutliers] = useState<OutlierOptionValue>((latest?.options.outliers as OutlierOptionValue) ?? "horn");
  const [transform, setTransform] = useState<TransformOptionValue>((latest?.options.transform as TransformOptionValue) ?? "auto");
  const [seed, setSeed] = useState(String(latest?.options.seed ?? 1));
  const [seedError, setSeedError] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);
  const slug = partitionKey(partition).replace(/[^A-Za-z0-9]+/g, "-");

  async function estimate(event: FormEvent) {
    event.preventDefault();
    setError(null);
    const s = Number(seed);
    if (!/^-?\d+$/.test(seed.trim()) || !Number.isSafeInteger(s)) {
      setSeedError("The seed is a whole number; 1 unless you need another resampling.");
      return;
    }
    setSeedError(null);
    setPending(true);
    try {
      const p = cleanPartition(partition);
      await sendJson<EstimateDocument>("POST", `${api}/estimates`, {
        ...(Object.keys(p).length > 0 ? { partition: p } : {}),
        outliers,
        transform,
        seed: s,
      });
      onEstimated();
    } catch (e) {
      setError(e);
    } finally {
      setPending(false);
    }
  }

  return (
    <article className="space-y-3 border-t border-ink-100 pt-4 first:border-t-0 first:pt-0" aria-labelledby={`est-${slug}`} data-testid={`estimate-${label}`}>
      <h3 id={`est-${slug}`} className="text-sm font-semibold text-ink-900">{label}</h3>
      <form onSubmit={estimate} aria-label={`Estimate ${label}`} className="flex flex-wrap items-end gap-3">
        <div className="w-56 space-y-1">
          <label htmlFor={`${slug}-outliers`} className={labelClass}>Outlier screen</label>
          <select id={`${slug}-outliers`} className={inputClass} value={outliers} onChange={(e) => setOutliers(e.target.value as OutlierOptionValue)}>
            {OUTLIER_CHOICES.map((o) => <option key={o.value} value={o.value}>{o.label}</option>)}
          </select>
        </div>
        <div className="w-60 space-y-1">
          <label htmlFor={`${slug}-transform`} className={labelClass}>Parametric scale</label>
          <select id={`${slug}-transform`} className={inputClass} value={transform} onChange={(e) => setTransform(e.target.value as TransformOptionValue)}>
            {TRANSFORM_CHOICES.map((o) => <option key={o.value} value={o.value}>{o.label}</option>)}
          </select>
        </div>
        <div className="w-28 space-y-1">
          <label htmlFor={`${slug}-seed`} className={labelClass}>Seed</label>
          <input id={`${slug}-seed`} className={inputClass} inputMode="numeric" value={seed} onChange={(e) => setSeed(e.target.value)} aria-invalid={seedError ? true : undefined} aria-describedby={seedError ? `${slug}-seed-error` : undefined} />
        </div>
        <Button type="submit" disabled={pending || closed}>{pending ? "Estimating…" : latest ? "Estimate again" : "Estimate"}</Button>
      </form>
      {seedError ? <p id={`${slug}-seed-error`} className="text-xs text-signal-high">{seedError}</p> : null}
      <p className="text-xs text-ink-500">The screen named here only lists proposals: the limits use every donor result without a confirmed exclusion.</p>
      <ErrorNotice error={error} action={`${label} was not estimated`} />
      {pending && !latest ? <Skeleton chart lines={3} label={`Estimating ${label}`} /> : null}
      {latest ? (
        <EstimateView api={api} summary={latest} analyte={analyte} />
      ) : !pending ? (
        <EmptyState title={`${label} has no estimate yet.`}>
          <p>Keep the usual options (Horn, automatic scale, seed 1) and press Estimate.</p>
        </EmptyState>
      ) : null}
    </article>
  );
}

function EstimateView({ api, summary, analyte }: { api: string; summary: EstimateListItem; analyte: SectionAnalyte }) {
  const doc = useSWR<EstimateDocument>(`${api}/estimates/${summary.id}`, fetchJson);
  const charts = useSWR<EstimateChartData>(`${api}/estimates/${summary.id}/chart-data`, fetchJson);
  const d = analyte.decimals;
  const e = doc.data;
  const measuredN = e ? e.n - e.censored.below - e.censored.above : summary.n;
  const recommended = summary.recommended;
  const nOf = (m: EstimateMethod) => (m === "nonparametric" ? summary.n : measuredN);
  const p = summary.parametric;
  const scale = { transform: p.transform, lambda: p.lambda };
  const drawn: EstimateMethod = recommended ?? "nonparametric";
  return (
    <div className="grid gap-4 2xl:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
      <div className="min-w-0 space-y-3">
        <p className="text-sm text-ink-700">
          n = {summary.n}; estimated {formatIsoDate(summary.createdAt, true)} with {summary.options.outliers ?? "horn"} screen, {summary.options.transform ?? "auto"} scale, seed{" "}
          {summary.options.seed ?? 1}.{" "}
          {recommended ? (
            <>Recommended: <strong>{METHOD_WORDS[recommended]}</strong>.</>
          ) : (
            <strong>No method is recommended: see the warnings.</strong>
          )}
        </p>
        <div className="overflow-x-auto rounded-md border border-ink-200">
          <table className={tableClass} aria-label="Methods side by side">
            <thead className="bg-ink-50">
              <tr>
                <th scope="col" className={thClass}>Method</th>
                <th scope="col" className={thClass}>Lower ({analyte.unit})</th>
                <th scope="col" className={thClass}>90% CI</th>
                <th scope="col" className={thClass}>Upper ({analyte.unit})</th>
                <th scope="col" className={thClass}>90% CI</th>
                <th scope="col" className={thClass}>n</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100 bg-white">
              {METHODS.map((m) => {
                const l = summary[m];
                const np = m === "nonparametric" ? summary.nonparametric : null;
                return (
                  <tr key={m} className={m === recommended ? "bg-tide-50/60" : undefined}>
                    <th scope="row" className={`${tdClass} text-left font-medium`}>
                      {METHOD_WORDS[m]}
                      {m === "parametric" && hasLimits(l) ? <span className="block text-xs font-normal text-ink-600">{scaleWords(scale)}</span> : null}
                      {m === recommended ? <span className="mt-0.5 block text-xs font-semibold text-tide-700">Recommended</span> : null}
                      {m === "robust" && !hasLimits(l) ? (
                        <span className="block text-xs font-normal text-ink-600">
                          Not computed: the robust method applies from {ROBUST_MIN_N} to {ROBUST_MAX_N} values
                        </span>
                      ) : null}
                    </th>
                    <td className={tdClass}>{np?.lowerCensored ? `${np.lowerCensored} ` : ""}{formatValue(l.lower, d)}</td>
                    <td className={`${tdClass} whitespace-nowrap`}>{formatCi(l.lowerCi, d)}</td>
                    <td className={tdClass}>{np?.upperCensored ? `${np.upperCensored} ` : ""}{formatValue(l.upper, d)}</td>
                    <td className={`${tdClass} whitespace-nowrap`}>{formatCi(l.upperCi, d)}</td>
                    <td className={tdClass}>{hasLimits(l) ? nOf(m) : "—"}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        {e ? (
          <dl className="grid gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
            <dt className="text-ink-600">Scale</dt>
            <dd>
              {scaleWords(scale)}
              {e.parametric.scaleChoice
                ? ` (λ̂ = ${e.parametric.scaleChoice.lambdaHat.toFixed(2)}; test against raw p ${formatP(e.parametric.scaleChoice.lrtAgainstRaw.p)}, against ln p ${formatP(e.parametric.scaleChoice.lrtAgainstLn.p)})`
                : ""}
            </dd>
            <dt className="text-ink-600">Normality on that scale</dt>
            <dd>
              Shapiro-Wilk {e.normality.shapiroWilk ? `W = ${e.normality.shapiroWilk.w.toFixed(3)}, p ${formatP(e.normality.shapiroWilk.p)}` : "not computed"}; Anderson-Darling{" "}
              {e.normality.andersonDarling ? `A² = ${e.normality.andersonDarling.a2.toFixed(3)}, p ${formatP(e.normality.andersonDarling.p)}` : "not computed"}
            </dd>
            <dt className="text-ink-600">Censored values</dt>
            <dd>
              {e.censored.below + e.censored.above === 0
                ? "None"
                : `${e.censored.below} below a limit, ${e.censored.above} above (${(100 * e.censored.fraction).toFixed(1)}% of n)`}
            </dd>
            <dt className="text-ink-600">Proposed outliers</dt>
            <dd>{e.proposed.length === 0 ? "None" : `${e.proposed.length}, included in these limits until excluded under Screening (${e.proposed.map((x) => formatValue(x.value, d)).join(", ")})`}</dd>
          </dl>
        ) : doc.error ? (
          <ErrorNotice error={doc.error} action="The estimate's details could not be loaded" />
        ) : (
          <Skeleton lines={3} label="Loading the estimate's details" />
        )}
        {summary.warnings.length > 0 ? (
          <div className="space-y-1">
            <h4 className="text-xs font-semibold uppercase tracking-wide text-signal-warn">Warnings</h4>
            <ul className="list-disc space-y-0.5 pl-5 text-sm text-ink-800">
              {summary.warnings.map((w) => <li key={w}>{w}</li>)}
            </ul>
          </div>
        ) : null}
      </div>
      <div className="grid min-w-0 gap-4 lg:grid-cols-2 2xl:grid-cols-1">
        {charts.error ? <ErrorNotice error={charts.error} action="The charts could not be loaded" /> : null}
        {!charts.data && !charts.error ? <Skeleton chart lines={0} label="Loading the charts" /> : null}
        {charts.data?.histogram ? (
          <HistogramChart
            bins={charts.data.histogram.bins}
            curve={charts.data.histogram.curve}
            limits={summary[drawn]}
            limitsMethod={METHOD_WORDS[drawn].toLowerCase()}
            fitScale={scaleWords(charts.data.scale)}
            unit={analyte.unit}
            decimals={d}
            proposed={e?.proposed.map((x) => x.value) ?? []}
          />
        ) : null}
        {charts.data?.qq ? (
          <QqChart
            points={charts.data.qq.points}
            line={charts.data.qq.line}
            scale={charts.data.scale}
            n={charts.data.n}
            thinned={charts.data.qq.thinned}
            limits={summary[drawn]}
            unit={analyte.unit}
            decimals={d}
          />
        ) : null}
        {charts.data && !charts.data.histogram ? <p className="text-sm text-ink-600">Too few distinct measured values to draw the histogram and Q-Q plot.</p> : null}
      </div>
    </div>
  );
}
