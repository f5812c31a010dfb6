"use client";

import { useState } from "react";
import useSWR from "swr";
import { IndirectChart } from "@/components/charts/indirect-chart";
import { Button } from "@/components/ui/button";
import { formatValue } from "@/lib/format";
import { fetchJson, sendJson, studyApi } from "../analysis/api";
import { AnalysisSection, DoneNotice, EmptyState, ErrorNotice, inputClass, labelClass, Skeleton, tableClass, tdClass, thClass } from "../analysis/feedback";
import type { SectionAnalyte, SectionStudy } from "../analysis/types";
import { indirectPartitionWords, isIndirectItem, type IndirectEstimate, type IndirectListItem, type RoutineVocabulary } from "./types";

/** Settings that are low-prevalence sources and stay in by default (Jones et al. 2019 prefer them). */
const LOW_PREVALENCE = ["outpatient", "outpatients", "primary care", "general practice", "health check"];

/** Values the estimate needs after cleaning (lib/studies/indirect-estimates.ts's INDIRECT_MIN_VALUES). */
const MIN_VALUES = 500;

const pct = (v: number) => `${(v * 100).toFixed(1)}%`;

/** A field that sits in a line of words rather than filling its column. */
const inlineInput = inputClass.replace("block w-full ", "");

/** The study's indirect estimates, newest first, through the estimates list's SWR key (shared with the Draft section). */
export function useIndirectEstimates(studyId: string) {
  const key = `${studyApi(studyId)}/estimates`;
  const swr = useSWR<{ items: (IndirectListItem & { options: Record<string, unknown> })[] }>(key, fetchJson);
  const items = (swr.data?.items ?? []).filter(isIndirectItem) as IndirectListItem[];
  return { key, swr, items };
}

type FlagChoice = "any" | "chosen" | "keep";

/**
 * Step 2 of an indirect study: choose the data-cleaning steps (the IFCC's: a stable period,
 * low-prevalence settings, no interference flags, one result per patient, a partition), run the
 * truncated maximum likelihood estimate, and read the path from the file to the values, the
 * chart, the limits with the second opinion beside them, and the advice.
 */
export function IndirectPanel({ study, analyte, vocabulary }: { study: SectionStudy; analyte: SectionAnalyte; vocabulary: RoutineVocabulary }) {
  const { swr, items } = useIndirectEstimates(study.id);
  const [from, setFrom] = useState(vocabulary.period?.from ?? "");
  const [to, setTo] = useState(vocabulary.period?.to ?? "");
  const [excluded, setExcluded] = useState<string[]>(
    vocabulary.settings.map((s) => s.name).filter((s) => !LOW_PREVALENCE.includes(s.toLowerCase())),
  );
  const [flagChoice, setFlagChoice] = useState<FlagChoice>("any");
  const [flags, setFlags] = useState<string[]>([]);
  const [which, setWhich] = useState<"first" | "last" | "all">("first");
  const [sex, setSex] = useState<"" | "F" | "M">("");
  const [ageFrom, setAgeFrom] = useState("");
  const [ageTo, setAgeTo] = useState("");
  const [seed, setSeed] = useState("1");
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);
  const [done, setDone] = useState<string | null>(null);
  const [selected, setSelected] = useState<string | null>(null);
  const shown = selected ?? items[0]?.id ?? null;
  const open = study.status === "open";
  const results = study.donorResultCount ?? 0;

  const toggle = (list: string[], set: (v: string[]) => void, name: string) =>
    set(list.includes(name) ? list.filter((x) => x !== name) : [...list, name]);

  async function estimate(event: React.FormEvent) {
    event.preventDefault();
    setPending(true);
    setError(null);
    setDone(null);
    try {
      const partition: Record<string, unknown> = {};
      if (sex) partition.sex = sex;
      if (ageFrom.trim() !== "") partition.ageFrom = Number(ageFrom);
      if (ageTo.trim() !== "") partition.ageTo = Number(ageTo);
      const body = {
        method: "indirect",
        cleaning: {
          period: from && to ? { from, to } : null,
          excludeSettings: excluded,
          excludeFlags: flagChoice === "any" ? "any" : flagChoice === "chosen" ? flags : [],
          onePerPatient: which,
        },
        ...(Object.keys(partition).length > 0 ? { partition } : {}),
        seed: Number(seed),
      };
      const made = await sendJson<IndirectEstimate>("POST", `${studyApi(study.id)}/estimates`, body);
      await swr.mutate();
      setSelected(made.id);
      setDone(`Estimated ${indirectPartitionWords(made.partition).toLowerCase()} from ${made.n.toLocaleString("en")} results: ${formatValue(made.lower, analyte.decimals)}–${formatValue(made.upper, analyte.decimals)} ${analyte.unit}.`);
    } catch (err) {
      setError(err);
    } finally {
      setPending(false);
    }
  }

  const state = {
    done: items.length > 0 ? `${items.length} indirect estimate${items.length === 1 ? "" : "s"}.` : "Not estimated yet.",
    next:
      results < MIN_VALUES
        ? `Upload routine results first (step 1): at least ${MIN_VALUES} must remain after cleaning; several thousand are advised.`
        : items.length > 0
          ? "Read the cleaning path, the chart and the advice; estimate each partition you need; then draft a version (step 3)."
          : "Choose the cleaning steps and estimate.",
  };

  return (
    <AnalysisSection id="indirect" step={2} title="Clean and estimate" state={state}>
      <p className="text-sm text-ink-700">
        Indirect estimation separates the non-diseased results statistically from the rest: truncated maximum likelihood on a power-normal
        (Box-Cox) model, with Bhattacharya&apos;s procedure beside it as a second opinion. It supports, and does not replace, the judgement of
        the laboratory&apos;s director.
      </p>
      {open ? (
        <form onSubmit={estimate} className="space-y-4" aria-label="Clean and estimate">
          <div className="grid gap-4 md:grid-cols-2">
            <fieldset className="space-y-1">
              <legend className={labelClass}>1. Stable analytical period (collection dates)</legend>
              <div className="flex items-center gap-2">
                <input aria-label="Period from" type="date" className={inputClass} value={from} onChange={(e) => setFrom(e.target.value)} />
                <span className="text-sm text-ink-600">to</span>
                <input aria-label="Period to" type="date" className={inputClass} value={to} onChange={(e) => setTo(e.target.value)} />
              </div>
              <p className="text-xs text-ink-600">Leave out results from before a method, reagent or calibrator change. Empty keeps every date.</p>
            </fieldset>
            <fieldset className="space-y-1">
              <legend className={labelClass}>2. Settings to exclude</legend>
              {vocabulary.settings.length === 0 ? (
                <p className="text-sm text-ink-600">The results name no setting.</p>
              ) : (
                <div className="flex flex-wrap gap-3 text-sm">
                  {vocabulary.settings.map((s) => (
                    <label key={s.name} className="flex items-center gap-1.5">
                      <input type="checkbox" checked={excluded.includes(s.name)} onChange={() => toggle(excluded, setExcluded, s.name)} />
                      {s.name} <span className="text-ink-500">({s.count.toLocaleString("en")})</span>
                    </label>
                  ))}
                </div>
              )}
              <p className="text-xs text-ink-600">Keep low-prevalence sources (outpatients, primary care); inpatients and emergencies hold more disease.</p>
            </fieldset>
            <fieldset className="space-y-1">
              <legend className={labelClass}>3. Flagged results</legend>
              <div className="flex flex-wrap gap-3 text-sm">
                {(
                  [
                    ["any", "Exclude every flagged result"],
                    ["chosen", "Exclude these flags"],
                    ["keep", "Keep flagged results"],
                  ] as const
                ).map(([value, words]) => (
                  <label key={value} className="flex items-center gap-1.5">
                    <input type="radio" name="flag-choice" value={value} checked={flagChoice === value} onChange={() => setFlagChoice(value)} />
                    {words}
                  </label>
                ))}
              </div>
              {flagChoice === "chosen" ? (
                <div className="flex flex-wrap gap-3 text-sm">
                  {vocabulary.flags.length === 0 ? <span className="text-ink-600">The results carry no flags.</span> : null}
                  {vocabulary.flags.map((f) => (
                    <label key={f.name} className="flex items-center gap-1.5">
                      <input type="checkbox" checked={flags.includes(f.name)} onChange={() => toggle(flags, setFlags, f.name)} />
                      {f.name} <span className="text-ink-500">({f.count.toLocaleString("en")})</span>
                    </label>
                  ))}
                </div>
              ) : null}
            </fieldset>
            <fieldset className="space-y-1">
              <legend className={labelClass}>4. Results per patient</legend>
              <div className="flex flex-wrap gap-3 text-sm">
                {(
                  [
                    ["first", "First result"],
                    ["last", "Last result"],
                    ["all", "Every result"],
                  ] as const
                ).map(([value, words]) => (
                  <label key={value} className="flex items-center gap-1.5">
                    <input type="radio" name="one-per-patient" value={value} checked={which === value} onChange={() => setWhich(value)} />
                    {words}
                  </label>
                ))}
              </div>
              <p className="text-xs text-ink-600">Patients tested again and again are more often ill: keeping every result widens the interval.</p>
            </fieldset>
            <fieldset className="space-y-1">
              <legend className={labelClass}>5. Partition</legend>
              <div className="flex flex-wrap items-center gap-2 text-sm">
                <select aria-label="Sex" className={inlineInput + " w-36"} value={sex} onChange={(e) => setSex(e.target.value as "" | "F" | "M")}>
                  <option value="">Women and men</option>
                  <option value="F">Women</option>
                  <option value="M">Men</option>
                </select>
                <span>aged</span>
                <input aria-label="Age from" className={inlineInput + " w-20"} inputMode="decimal" placeholder="from" value={ageFrom} onChange={(e) => setAgeFrom(e.target.value)} />
                <span>to under</span>
                <input aria-label="Age to" className={inlineInput + " w-20"} inputMode="decimal" placeholder="to" value={ageTo} onChange={(e) => setAgeTo(e.target.value)} />
                <span>years</span>
              </div>
            </fieldset>
            <div className="w-28 space-y-1">
              <label htmlFor="indirect-seed" className={labelClass}>
                Seed
              </label>
              <input id="indirect-seed" className={inputClass} inputMode="numeric" value={seed} onChange={(e) => setSeed(e.target.value)} />
            </div>
          </div>
          <Button type="submit" disabled={pending || results === 0}>
            {pending ? "Estimating…" : "Clean and estimate"}
          </Button>
          <p className="text-xs text-ink-600">
            The steps run in the order shown, each recorded with the results it removed. The seed drives the bootstrap of the limits&apos; 90% CIs
            and is stored with the estimate. A fit of 100,000 results takes a few seconds.
          </p>
        </form>
      ) : null}
      <ErrorNotice error={error} action="Estimating" />
      <DoneNotice>{done}</DoneNotice>
      {swr.error ? <ErrorNotice error={swr.error} action="Loading the estimates" /> : null}
      {!swr.data && !swr.error ? <Skeleton lines={2} label="Loading the estimates" /> : null}
      {swr.data && items.length === 0 ? (
        <EmptyState title="No estimate yet" testId="indirect-empty">
          <p>
            {results === 0 ? "Upload the routine results under " : "Choose the cleaning steps above and estimate. The results come from "}
            <a href="#donor-results" className="underline">Routine results</a>.
          </p>
        </EmptyState>
      ) : null}
      {items.length > 0 ? (
        <div className="space-y-4">
          <table className={tableClass} data-testid="indirect-estimates">
            <caption className="sr-only">Indirect estimates of this study</caption>
            <thead>
              <tr>
                <th className={thClass}>Shown</th>
                <th className={thClass}>Partition</th>
                <th className={thClass}>n</th>
                <th className={thClass}>Limits ({analyte.unit})</th>
                <th className={thClass}>Non-diseased</th>
                <th className={thClass}>Warnings</th>
                <th className={thClass}>Made</th>
              </tr>
            </thead>
            <tbody>
              {items.map((e) => (
                <tr key={e.id}>
                  <td className={tdClass}>
                    <input type="radio" name="indirect-shown" aria-label={`Show the estimate of ${e.createdAt}`} checked={shown === e.id} onChange={() => setSelected(e.id)} />
                  </td>
                  <td className={tdClass}>{indirectPartitionWords(e.partition)}</td>
                  <td className={tdClass + " tabular-nums"}>{e.n.toLocaleString("en")}</td>
                  <td className={tdClass + " tabular-nums"}>
                    {formatValue(e.indirect.lower, analyte.decimals)}–{formatValue(e.indirect.upper, analyte.decimals)}
                  </td>
                  <td className={tdClass + " tabular-nums"}>{pct(e.indirect.fraction)}</td>
                  <td className={tdClass}>{e.warnings.length}</td>
                  <td className={tdClass}>{e.createdAt.slice(0, 16).replace("T", " ")}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {shown ? <IndirectEstimateView studyId={study.id} estimateId={shown} analyte={analyte} /> : null}
        </div>
      ) : null}
    </AnalysisSection>
  );
}

/** One indirect estimate: the cleaning path, the warnings, the chart, the limits beside the second opinion, the fit and the advice. */
function IndirectEstimateView({ studyId, estimateId, analyte }: { studyId: string; estimateId: string; analyte: SectionAnalyte }) {
  const { data, error } = useSWR<IndirectEstimate>(`${studyApi(studyId)}/estimates/${estimateId}`, fetchJson);
  if (error) return <ErrorNotice error={error} action="Loading the estimate" />;
  if (!data) return <Skeleton chart lines={3} label="Loading the estimate" />;
  const d = analyte.decimals;
  const f = (v: number | null | undefined) => formatValue(v, d);
  const ci = (c: [number, number] | null) => (c ? `${f(c[0])}–${f(c[1])}` : "—");
  const standing = data.advice.filter((a) => !data.warnings.includes(a) && a !== data.settings.warning);
  const warnings = [...data.warnings, ...(data.settings.warning ? [data.settings.warning] : [])];
  return (
    <div className="space-y-4" data-testid="indirect-estimate">
      <div>
        <h3 className="text-sm font-semibold text-ink-900">From the file to the values estimated</h3>
        <table className={tableClass} data-testid="indirect-cleaning">
          <caption className="sr-only">Cleaning steps with the results each removed</caption>
          <thead>
            <tr>
              <th className={thClass}>Step</th>
              <th className={thClass}>What it did</th>
              <th className={thClass + " text-right"}>Removed</th>
              <th className={thClass + " text-right"}>Remaining</th>
            </tr>
          </thead>
          <tbody>
            <tr>
              <td className={tdClass}>Routine results</td>
              <td className={tdClass}>
                in the study{data.cleaning.excluded > 0 ? `, less ${data.cleaning.excluded.toLocaleString("en")} excluded by hand` : ""}
              </td>
              <td className={tdClass + " text-right tabular-nums"}>{data.cleaning.excluded > 0 ? data.cleaning.excluded.toLocaleString("en") : "—"}</td>
              <td className={tdClass + " text-right tabular-nums"}>{(data.cleaning.results - data.cleaning.excluded).toLocaleString("en")}</td>
            </tr>
            {data.cleaning.steps.map((s) => (
              <tr key={s.step}>
                <td className={tdClass}>{s.step}</td>
                <td className={tdClass}>{s.description}</td>
                <td className={tdClass + " text-right tabular-nums"}>{s.removed.toLocaleString("en")}</td>
                <td className={tdClass + " text-right tabular-nums"}>{s.remaining.toLocaleString("en")}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {warnings.length > 0 ? (
        <ul className="space-y-1 rounded-md bg-amber-50 px-3 py-2 text-sm text-amber-900" data-testid="indirect-warnings">
          {warnings.map((w) => (
            <li key={w}>⚠ {w}</li>
          ))}
        </ul>
      ) : null}
      <IndirectChart
        bins={data.histogram}
        truncation={data.truncation}
        fraction={data.fraction}
        limits={{ lower: data.lower, upper: data.upper, lowerCi: data.lowerCi, upperCi: data.upperCi }}
        unit={analyte.unit}
        decimals={d}
      />
      <div className="grid gap-4 md:grid-cols-2">
        <table className={tableClass} data-testid="indirect-limits">
          <caption className="text-left text-sm font-semibold text-ink-900">Limits ({analyte.unit})</caption>
          <thead>
            <tr>
              <th className={thClass}>Method</th>
              <th className={thClass}>Lower (90% CI)</th>
              <th className={thClass}>Upper (90% CI)</th>
            </tr>
          </thead>
          <tbody>
            <tr>
              <td className={tdClass}>Truncated maximum likelihood</td>
              <td className={tdClass + " tabular-nums"}>
                {f(data.lower)} <span className="text-ink-500">({ci(data.lowerCi)})</span>
              </td>
              <td className={tdClass + " tabular-nums"}>
                {f(data.upper)} <span className="text-ink-500">({ci(data.upperCi)})</span>
              </td>
            </tr>
            <tr>
              <td className={tdClass}>Bhattacharya (second opinion)</td>
              <td className={tdClass + " tabular-nums"}>{f(data.secondOpinion.lower)}</td>
              <td className={tdClass + " tabular-nums"}>{f(data.secondOpinion.upper)}</td>
            </tr>
          </tbody>
        </table>
        <dl className="grid grid-cols-2 gap-x-3 gap-y-1 text-sm" data-testid="indirect-fit">
          <dt className="text-ink-600">Values estimated</dt>
          <dd className="tabular-nums">{data.n.toLocaleString("en")}</dd>
          <dt className="text-ink-600">Non-diseased share</dt>
          <dd className="tabular-nums">{pct(data.fraction)}</dd>
          <dt className="text-ink-600">Truncation interval</dt>
          <dd className="tabular-nums">
            {f(data.truncation[0])}–{f(data.truncation[1])} {analyte.unit}
          </dd>
          <dt className="text-ink-600">Box-Cox λ, μ, σ</dt>
          <dd className="tabular-nums">
            {data.lambda.toFixed(3)}, {data.mu.toFixed(4)}, {data.sigma.toFixed(4)}
          </dd>
          <dt className="text-ink-600">Fit (χ²)</dt>
          <dd className="tabular-nums">
            {data.chiSquare.toFixed(1)} on {data.df} df, p = {data.pValue.toFixed(3)}
            {data.accepted ? "" : " (no interval passed)"}
          </dd>
          <dt className="text-ink-600">Bootstrap</dt>
          <dd className="tabular-nums">
            {data.bootstrap.replicates} replicates, seed {data.bootstrap.seed}
          </dd>
        </dl>
      </div>
      <div>
        <h3 className="text-sm font-semibold text-ink-900">What the method assumes</h3>
        <ul className="list-disc space-y-1 pl-5 text-sm text-ink-700" data-testid="indirect-advice">
          {standing.map((a) => (
            <li key={a}>{a}</li>
          ))}
        </ul>
      </div>
    </div>
  );
}
