"use client";

import { useState, type FormEvent } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { formatIsoDate, formatValue, formatZ } from "@/lib/format";
import { fetchJson, sendJson, studyApi } from "./api";
import {
  AnalysisSection,
  DoneNotice,
  EmptyState,
  ErrorNotice,
  inputClass,
  labelClass,
  type SectionState,
  Skeleton,
  tableClass,
  tdClass,
  thClass,
} from "./feedback";
import { formatBands, parseAgeBands, partitionLabel } from "./partitions";
import type { PartitionAssessment, PartitionPlanAnswer, SectionProps, Sex } from "./types";
import { useStudy } from "./use-study";

const VERDICT_WORDS: Record<string, string> = {
  partition: "Partition",
  combine: "Combine",
  marginal: "Marginal",
  undecided: "Undecided",
};

function assessmentTitle(a: PartitionAssessment): string {
  if (a.by === "sex") return "By sex";
  return `By age bands ${formatBands(a.bands)}${a.sex ? ` (${a.sex === "F" ? "female" : "male"} donors)` : ""}`;
}

/** Partitions: assess by sex and by age bands (Harris-Boyd beside Lahti), then choose the partitions. */
export function PartitionsPanel({ study: initial, analyte }: SectionProps) {
  const { study, plan, refresh } = useStudy(initial);
  const api = studyApi(study.id);
  const closed = study.status === "closed";
  const assessments = useSWR<{ items: PartitionAssessment[] }>(`${api}/partition-assessments`, fetchJson);
  const [bandsText, setBandsText] = useState("[0, 18) [18, 120)");
  const [bandsSex, setBandsSex] = useState<"" | Sex>("");
  const [bandsError, setBandsError] = useState<string | null>(null);
  const [running, setRunning] = useState<"sex" | "age" | null>(null);
  const [error, setError] = useState<unknown>(null);
  const [shownId, setShownId] = useState<string | null>(null);

  async function assess(by: "sex" | "age", event?: FormEvent) {
    event?.preventDefault();
    setError(null);
    let body: unknown = { by: "sex" };
    if (by === "age") {
      const parsed = parseAgeBands(bandsText);
      if ("error" in parsed) {
        setBandsError(parsed.error);
        return;
      }
      setBandsError(null);
      body = bandsSex ? { by: "age", bands: parsed.bands, sex: bandsSex } : { by: "age", bands: parsed.bands };
    }
    setRunning(by);
    try {
      const created = await sendJson<PartitionAssessment>("POST", `${api}/partition-assessment`, body);
      await assessments.mutate((cur) => ({ items: [created, ...(cur?.items ?? []).filter((a) => a.id !== created.id)] }), { revalidate: false });
      setShownId(created.id);
    } catch (e) {
      setError(e);
    } finally {
      setRunning(null);
    }
  }

  const items = assessments.data?.items ?? [];
  const shown = items.find((a) => a.id === shownId) ?? items[0] ?? null;
  const latestSex = items.find((a) => a.by === "sex");
  const latestAge = items.find((a) => a.by === "age");

  const state: SectionState = {
    done:
        plan
          ? `Partitions chosen: ${planWords(plan)}.`
          : items.length > 0
            ? `${items.length} assessment${items.length === 1 ? "" : "s"} run; no partitions chosen yet (one interval for all donors).`
            : "No assessment run yet.",
    next: plan ? "Estimate each partition in step 4." : items.length > 0 ? "Choose the partitions." : "Assess by sex, then by age bands if the donors span ages.",
  };

  return (
    <AnalysisSection id="partitions" title="Partitions" step={3} state={state}>
      <div className="grid gap-4 lg:grid-cols-[auto_1fr] lg:items-start">
        <div className="lg:pt-5">
          <Button type="button" onClick={() => assess("sex")} disabled={running !== null || closed}>
            {running === "sex" ? "Assessing…" : "Assess by sex"}
          </Button>
        </div>
        <form onSubmit={(e) => assess("age", e)} aria-label="Assess by age bands" className="flex flex-wrap items-start gap-3">
          <div className="min-w-64 flex-1 space-y-1">
            <label htmlFor="age-bands" className={labelClass}>Age bands (years, half-open)</label>
            <input
              id="age-bands"
              className={inputClass}
              value={bandsText}
              onChange={(e) => setBandsText(e.target.value)}
              aria-invalid={bandsError ? true : undefined}
              aria-describedby={bandsError ? "age-bands-error" : "age-bands-hint"}
            />
            {bandsError ? (
              <p id="age-bands-error" className="text-xs text-signal-high">{bandsError}</p>
            ) : (
              <p id="age-bands-hint" className="text-xs text-ink-500">[0, 18) then [18, 120): from the first age up to, not including, the second.</p>
            )}
          </div>
          <div className="w-40 space-y-1">
            <label htmlFor="age-bands-sex" className={labelClass}>Within</label>
            <select id="age-bands-sex" className={inputClass} value={bandsSex} onChange={(e) => setBandsSex(e.target.value as "" | Sex)}>
              <option value="">All donors</option>
              <option value="F">Female donors</option>
              <option value="M">Male donors</option>
            </select>
          </div>
          <Button type="submit" variant="secondary" className="mt-5" disabled={running !== null || closed}>
            {running === "age" ? "Assessing…" : "Assess by age"}
          </Button>
        </form>
      </div>
      <ErrorNotice error={error} action="The assessment did not run" />

      {assessments.error ? <ErrorNotice error={assessments.error} action="The assessments could not be loaded" /> : null}
      {assessments.isLoading ? <Skeleton lines={4} label="Loading the assessments" /> : null}
      {assessments.data && items.length === 0 && !running ? (
        <EmptyState title="No partition assessment yet." testId="partitions-empty">
          <p>Assess by sex first; the Harris-Boyd and Lahti criteria then say whether men and women need their own limits.</p>
        </EmptyState>
      ) : null}
      {shown ? <AssessmentView assessment={shown} decimals={analyte.decimals} unit={analyte.unit} /> : null}
      {items.length > 1 ? (
        <div className="space-y-1">
          <h3 className="text-sm font-semibold text-ink-800">Earlier assessments</h3>
          <ul className="flex flex-wrap gap-2 text-sm">
            {items.map((a) => (
              <li key={a.id}>
                <button
                  type="button"
                  onClick={() => setShownId(a.id)}
                  aria-pressed={a.id === shown?.id}
                  className={`rounded-md border px-2 py-1 ${a.id === shown?.id ? "border-tide-500 bg-tide-50 text-tide-700" : "border-ink-200 bg-white text-ink-700 hover:bg-ink-50"}`}
                >
                  {assessmentTitle(a)}: {VERDICT_WORDS[a.verdict]}
                  {a.createdAt ? <span className="text-ink-500"> · {formatIsoDate(a.createdAt, true)}</span> : null}
                </button>
              </li>
            ))}
          </ul>
        </div>
      ) : null}

      <PlanForm
        api={api}
        plan={plan}
        closed={closed}
        suggestSex={latestSex?.verdict === "partition"}
        suggestBands={latestAge?.verdict === "partition" ? latestAge.bands : null}
        onSaved={refresh}
      />
    </AnalysisSection>
  );
}

function planWords(plan: { sex: boolean; ageBands: [number, number][] | null }): string {
  const parts: string[] = [];
  if (plan.sex) parts.push("by sex");
  if (plan.ageBands) parts.push(`by age ${formatBands(plan.ageBands)}`);
  return parts.length > 0 ? parts.join(" and ") : "none (one interval for all donors)";
}

function AssessmentView({ assessment: a, decimals, unit }: { assessment: PartitionAssessment; decimals: number; unit: string }) {
  return (
    <div className="space-y-3" data-testid="assessment">
      <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
        <h3 className="text-sm font-semibold text-ink-800">{assessmentTitle(a)}</h3>
        <span className="text-sm">
          Verdict: <strong>{VERDICT_WORDS[a.verdict]}</strong>
        </span>
      </div>
      <p className="max-w-3xl text-sm text-ink-800" data-testid="assessment-summary">{a.summary}</p>
      <div className="overflow-x-auto rounded-md border border-ink-200">
        <table className={tableClass} aria-label="Subgroups">
          <thead className="bg-ink-50">
            <tr>
              <th scope="col" className={thClass}>Subgroup</th>
              <th scope="col" className={thClass}>n</th>
              <th scope="col" className={thClass}>Mean ({unit})</th>
              <th scope="col" className={thClass}>SD</th>
              <th scope="col" className={thClass}>Median</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100 bg-white">
            {a.groups.map((g) => (
              <tr key={g.label}>
                <td className={tdClass}>{g.label || partitionLabel(g.partition)}</td>
                <td className={tdClass}>{g.n}</td>
                <td className={tdClass}>{formatValue(g.mean, decimals)}</td>
                <td className={tdClass}>{formatValue(g.sd, decimals + 1)}</td>
                <td className={tdClass}>{formatValue(g.median, decimals)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="overflow-x-auto rounded-md border border-ink-200">
        <table className={tableClass} aria-label="Harris-Boyd and Lahti side by side">
          <thead className="bg-ink-50">
            <tr>
              <th scope="col" className={thClass} rowSpan={2}>Between</th>
              <th scope="col" className={`${thClass} border-l border-ink-200 text-center`} colSpan={3}>Harris-Boyd</th>
              <th scope="col" className={`${thClass} border-l border-ink-200 text-center`} colSpan={2}>Lahti</th>
            </tr>
            <tr>
              <th scope="col" className={`${thClass} border-l border-ink-200`}>z / z*</th>
              <th scope="col" className={thClass}>SD ratio / limit</th>
              <th scope="col" className={thClass}>Verdict</th>
              <th scope="col" className={`${thClass} border-l border-ink-200`}>Outside the combined limits</th>
              <th scope="col" className={thClass}>Verdict</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100 bg-white">
            {a.comparisons.map((c) => {
              const hb = c.harrisBoyd;
              const la = c.lahti;
              const notRun = (c.problems ?? []).join(" ") || "Could not be computed.";
              return (
                <tr key={c.between.join("|")}>
                  <td className={`${tdClass} whitespace-nowrap`}>
                    {c.between[0]} vs {c.between[1]}
                    {c.verdict ? <span className="block text-xs text-ink-600">Together: {VERDICT_WORDS[c.verdict]}</span> : null}
                  </td>
                  {hb ? (
                    <>
                      <td className={`${tdClass} border-l border-ink-100 whitespace-nowrap`}>
                        {formatZ(hb.z)} / {formatZ(hb.zCritical)}
                      </td>
                      <td className={`${tdClass} whitespace-nowrap`}>
                        {formatZ(hb.sdRatio)} / {hb.sdRatioLimit ?? "—"}
                      </td>
                      <td className={tdClass}><strong>{VERDICT_WORDS[hb.verdict]}</strong></td>
                    </>
                  ) : (
                    <td className={`${tdClass} border-l border-ink-100 text-ink-600`} colSpan={3}>{notRun}</td>
                  )}
                  {la ? (
                    <>
                      <td className={`${tdClass} border-l border-ink-100`}>
                        <ul>
                          {(la.subgroups ?? []).map((s) => (
                            <li key={s.label} className="whitespace-nowrap">
                              {s.label}: {s.belowLowerPercent.toFixed(1)}% below, {s.aboveUpperPercent.toFixed(1)}% above
                            </li>
                          ))}
                        </ul>
                      </td>
                      <td className={tdClass}><strong>{VERDICT_WORDS[la.verdict]}</strong></td>
                    </>
                  ) : (
                    <td className={`${tdClass} border-l border-ink-100 text-ink-600`} colSpan={2}>{notRun}</td>
                  )}
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <p className="text-xs text-ink-500">
        Harris-Boyd: partition when z exceeds z* = 3·√((n₁ + n₂)/240) or the SD ratio exceeds 1.5. Lahti: partition when a subgroup has more than
        4.1% outside a combined limit, combine when each has at most 3.2%.
      </p>
      {(a.warnings ?? []).length > 0 ? (
        <ul className="list-disc space-y-0.5 pl-5 text-sm text-signal-warn">
          {a.warnings!.map((w) => <li key={w}>{w}</li>)}
        </ul>
      ) : null}
    </div>
  );
}

function PlanForm({
  api,
  plan,
  closed,
  suggestSex,
  suggestBands,
  onSaved,
}: {
  api: string;
  plan: { sex: boolean; ageBands: [number, number][] | null } | null;
  closed: boolean;
  suggestSex: boolean;
  suggestBands: [number, number][] | null;
  onSaved: () => void;
}) {
  const [bySex, setBySex] = useState(plan ? plan.sex : suggestSex);
  const [byAge, setByAge] = useState(plan ? plan.ageBands !== null : suggestBands !== null);
  const [bands, setBands] = useState(formatBands(plan?.ageBands ?? suggestBands ?? [[0, 18], [18, 120]]));
  const [bandsError, setBandsError] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);
  const [answer, setAnswer] = useState<PartitionPlanAnswer | null>(null);

  async function save(event: FormEvent) {
    event.preventDefault();
    setError(null);
    setAnswer(null);
    let ageBands: [number, number][] | null = null;
    if (byAge) {
      const parsed = parseAgeBands(bands);
      if ("error" in parsed) {
        setBandsError(parsed.error);
        return;
      }
      ageBands = parsed.bands;
    }
    setBandsError(null);
    setPending(true);
    try {
      const saved = await sendJson<PartitionPlanAnswer>("PUT", `${api}/partition-plan`, { sex: bySex, ageBands });
      setAnswer(saved);
      onSaved();
    } catch (e) {
      setError(e);
    } finally {
      setPending(false);
    }
  }

  return (
    <form onSubmit={save} aria-label="Choose the partitions" className="space-y-3 rounded-md border border-ink-200 bg-ink-50/60 p-3">
      <h3 className="text-sm font-semibold text-ink-800">Choose the partitions</h3>
      <div className="flex flex-wrap items-start gap-x-6 gap-y-2 text-sm">
        <label className="flex items-center gap-2">
          <input type="checkbox" checked={bySex} onChange={(e) => setBySex(e.target.checked)} disabled={closed} />
          Separate limits for female and male donors
        </label>
        <label className="flex items-center gap-2">
          <input type="checkbox" checked={byAge} onChange={(e) => setByAge(e.target.checked)} disabled={closed} />
          Separate limits by age band
        </label>
        {byAge ? (
          <div className="min-w-64 space-y-1">
            <label htmlFor="plan-bands" className={labelClass}>Age bands of the plan</label>
            <input id="plan-bands" className={inputClass} value={bands} onChange={(e) => setBands(e.target.value)} aria-invalid={bandsError ? true : undefined} aria-describedby={bandsError ? "plan-bands-error" : undefined} disabled={closed} />
            {bandsError ? <p id="plan-bands-error" className="text-xs text-signal-high">{bandsError}</p> : null}
          </div>
        ) : null}
      </div>
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={pending || closed}>{pending ? "Saving…" : "Use these partitions"}</Button>
        <span className="text-sm text-ink-600">Current choice: {plan ? planWords(plan) : "none yet (one interval for all donors)"}.</span>
      </div>
      <ErrorNotice error={error} action="The partitions were not saved" />
      {answer ? (
        <DoneNotice>
          Saved: {answer.partitions.length} partition{answer.partitions.length === 1 ? "" : "s"} ({answer.partitions.map((p) => partitionLabel(p)).join("; ")}). Estimate each below.
        </DoneNotice>
      ) : null}
    </form>
  );
}
