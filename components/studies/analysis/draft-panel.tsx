"use client";

import { useState, type FormEvent, type ReactNode } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { formatCi, formatIsoDate, formatValue } from "@/lib/format";
import { ApiError, fetchJson, sendJson } from "./api";
import { AnalysisSection, DoneNotice, EmptyState, ErrorNotice, inputClass, labelClass, type SectionState, Skeleton, tableClass, tdClass, thClass } from "./feedback";
import { partitionKey, partitionLabel } from "./partitions";
import type { EstimateListItem, EstimateMethod, IntervalVersion, Partition, SectionAnalyte, SectionProps, VersionPartition } from "./types";
import { hasLimits, METHOD_WORDS, useEstimates } from "./use-estimates";

const STATE_WORDS: Record<string, string> = {
  draft: "Draft",
  awaiting_signoff: "Awaiting sign-off",
  in_force: "In force",
  superseded: "Superseded",
  withdrawn: "Withdrawn",
};

function modelWords(m: VersionPartition["model"]): string {
  if (m.kind === "gaussian") {
    const t = m.transform === "box-cox" ? `Box-Cox, λ = ${(m.lambda ?? 0).toFixed(2)}` : m.transform === "ln" ? "ln" : "raw";
    return `Gaussian (${t})`;
  }
  if (m.kind === "empirical") return `Empirical${m.n ? ` (n ${m.n})` : ""}`;
  return m.kind;
}

function versionPartitionLabel(p: VersionPartition): string {
  return partitionLabel({ sex: p.sex ?? undefined, ageFrom: p.ageFrom ?? undefined, ageTo: p.ageTo ?? undefined });
}

const numberText = (v: number | null | undefined, decimals: number) => (v === null || v === undefined ? "" : v.toFixed(decimals));

/** Draft: one method per partition, critical limits and a note → a draft interval version; revise drafts. */
export function DraftPanel({ study: initial, analyte }: SectionProps) {
  const { study, partitions, latest, estimates } = useEstimates(initial);
  const versionsKey = `/api/v1/interval-versions?analyte=${encodeURIComponent(analyte.code)}&state=draft`;
  const drafts = useSWR<{ items: IntervalVersion[] }>(versionsKey, fetchJson);
  const [editing, setEditing] = useState<IntervalVersion | null>(null);
  const [created, setCreated] = useState<IntervalVersion | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  // The page may pass the analyte without its critical limits: the catalogue has them.
  const needCatalogue = analyte.criticalLow === undefined || analyte.criticalHigh === undefined;
  const catalogue = useSWR<SectionAnalyte>(needCatalogue ? `/api/v1/analytes/${encodeURIComponent(analyte.code)}` : null, fetchJson);
  const withLimits: SectionAnalyte = needCatalogue
    ? { ...analyte, criticalLow: catalogue.data?.criticalLow ?? null, criticalHigh: catalogue.data?.criticalHigh ?? null }
    : analyte;
  const catalogueSettled = !needCatalogue || catalogue.data !== undefined || catalogue.error !== undefined;
  const ready = partitions.filter((p) => latest.has(partitionKey(p)));
  const missing = partitions.filter((p) => !latest.has(partitionKey(p)));
  const items = drafts.data?.items ?? [];
  const ofThisStudy = items.filter((v) => v.studyId === study.id);
  const others = items.filter((v) => v.studyId !== study.id);

  const state: SectionState = {
    done: ofThisStudy.length > 0 ? `${ofThisStudy.length} draft version${ofThisStudy.length === 1 ? "" : "s"} from this study.` : "No draft version from this study yet.",
    next: missing.length > 0 ? "Estimate every partition in step 4 first." : ofThisStudy.length > 0 ? "Check the draft, revise it if needed, then submit it for sign-off." : "Pick a method per partition and create the draft.",
  };

  return (
    <AnalysisSection id="draft" title="Draft interval version" step={5} state={state}>
      {estimates.isLoading ? <Skeleton lines={3} /> : null}
      {estimates.error ? <ErrorNotice error={estimates.error} action="The estimates could not be loaded" /> : null}
      {estimates.data && ready.length === 0 ? (
        <EmptyState title="Nothing to draft yet." testId="draft-empty">
          <p>
            Estimate {partitions.length === 1 ? "the partition" : "each partition"} under <a href="#estimates">Estimates</a> first; the draft takes one
            method&apos;s limits per partition.
          </p>
        </EmptyState>
      ) : null}
      {estimates.data && ready.length > 0 && !catalogueSettled ? <Skeleton lines={3} label="Loading the analyte's critical limits" /> : null}
      {estimates.data && ready.length > 0 && catalogueSettled ? (
        <DraftForm
          key={editing?.id ?? "new"}
          studyId={study.id}
          analyte={withLimits}
          partitions={partitions}
          latest={latest}
          editing={editing}
          onDone={(v, message) => {
            setNotice(message);
            setCreated(v);
            setEditing(null);
            void drafts.mutate();
          }}
          onCancel={() => setEditing(null)}
        />
      ) : null}
      <DoneNotice>{notice}</DoneNotice>
      {created && !items.some((v) => v.id === created.id) ? <VersionCard version={created} title={`Draft version ${created.number}`} highlight /> : null}

      <div className="space-y-2">
        <h3 className="text-sm font-semibold text-ink-800">Draft versions of {analyte.code}</h3>
        {drafts.error ? <ErrorNotice error={drafts.error} action="The draft versions could not be loaded" /> : null}
        {drafts.isLoading ? <Skeleton lines={2} /> : null}
        {drafts.data && items.length === 0 ? <p className="text-sm text-ink-600">No draft version of {analyte.code} exists yet.</p> : null}
        {ofThisStudy.map((v) => (
          <VersionCard
            key={v.id}
            version={v}
            highlight={v.id === created?.id || v.id === editing?.id}
            title={`${v.id === created?.id ? "Draft version" : "Version"} ${v.number}`}
            action={
              study.status !== "closed" && v.id !== editing?.id ? (
                <Button
                  type="button"
                  variant="secondary"
                  className="px-2 py-1 text-xs"
                  onClick={() => {
                    setNotice(null);
                    setEditing(v);
                  }}
                >
                  Revise version {v.number}
                </Button>
              ) : null
            }
          />
        ))}
        {others.length > 0 ? (
          <div className="space-y-1">
            <p className="text-sm text-ink-700">
              {others.length} draft version{others.length === 1 ? "" : "s"} of {analyte.code} from other studies:
            </p>
            <ul className="divide-y divide-ink-100 rounded-md border border-ink-200 text-sm" aria-label={`Draft versions of ${analyte.code} from other studies`}>
              {others.map((v) => (
                <li key={v.id} className="px-3 py-1.5">
                  <a href={`/versions/${v.id}`}>Version {v.number}</a> · {v.partitions.map((p) => `${versionPartitionLabel(p)} ${formatValue(p.low, v.decimals)} – ${formatValue(p.high, v.decimals)}`).join("; ")} ·
                  drafted {formatIsoDate(v.createdAt, true)}
                  {v.createdBy ? ` by ${v.createdBy.name}` : ""}
                </li>
              ))}
            </ul>
          </div>
        ) : null}
      </div>
    </AnalysisSection>
  );
}

function DraftForm({
  studyId,
  analyte,
  partitions,
  latest,
  editing,
  onDone,
  onCancel,
}: {
  studyId: string;
  analyte: SectionAnalyte;
  partitions: Partition[];
  latest: Map<string, EstimateListItem>;
  editing: IntervalVersion | null;
  onDone: (v: IntervalVersion, message: string) => void;
  onCancel: () => void;
}) {
  // What the scientist picked; a partition estimated after the form opened takes its default.
  const [picked, setPicked] = useState<Record<string, EstimateMethod>>({});
  const methodOf = (p: Partition): EstimateMethod => {
    const k = partitionKey(p);
    const e = latest.get(k)!;
    if (picked[k] && hasLimits(e[picked[k]])) return picked[k];
    const was = editing?.partitions.find((vp) => partitionKey({ sex: vp.sex ?? undefined, ageFrom: vp.ageFrom ?? undefined, ageTo: vp.ageTo ?? undefined }) === k);
    if (was && hasLimits(e[was.method])) return was.method;
    if (e.recommended) return e.recommended;
    return (["nonparametric", "parametric", "robust"] as const).find((m) => hasLimits(e[m])) ?? "nonparametric";
  };
  const [criticalLow, setCriticalLow] = useState(numberText(editing ? editing.criticalLow : analyte.criticalLow, analyte.decimals));
  const [criticalHigh, setCriticalHigh] = useState(numberText(editing ? editing.criticalHigh : analyte.criticalHigh, analyte.decimals));
  const [note, setNote] = useState(editing?.note ?? "");
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [error, setError] = useState<unknown>(null);
  const [pending, setPending] = useState(false);
  const usable = partitions.filter((p) => latest.has(partitionKey(p)));
  const d = analyte.decimals;

  async function submit(event: FormEvent) {
    event.preventDefault();
    setError(null);
    const errors: Record<string, string> = {};
    const num = (s: string, name: string) => {
      if (!s.trim()) return null;
      const v = Number(s.trim().replace(",", "."));
      if (!Number.isFinite(v)) errors[name] = `Type a number in ${analyte.unit}, or leave it empty for none.`;
      return v;
    };
    const low = num(criticalLow, "criticalLow");
    const high = num(criticalHigh, "criticalHigh");
    if (low !== null && high !== null && !errors.criticalLow && !errors.criticalHigh && !(low < high)) {
      errors.criticalHigh = `The critical low limit (${low}) must be below the critical high limit (${high}).`;
    }
    setFieldErrors(errors);
    if (Object.keys(errors).length > 0) return;
    const body = {
      partitions: usable.map((p) => ({ estimate: latest.get(partitionKey(p))!.id, method: methodOf(p) })),
      criticalLow: low,
      criticalHigh: high,
      note: note.trim() || null,
    };
    setPending(true);
    try {
      const v = editing
        ? await sendJson<IntervalVersion>("PATCH", `/api/v1/interval-versions/${editing.id}`, body)
        : await sendJson<IntervalVersion>("POST", "/api/v1/interval-versions", { analyte: analyte.code, study: studyId, ...body });
      onDone(v, editing ? `Version ${v.number} revised.` : `Draft version ${v.number} created.`);
    } catch (e) {
      setError(e);
      if (e instanceof ApiError) {
        const fe: Record<string, string> = {};
        for (const f of e.fieldErrors) fe[f.path] = f.message;
        setFieldErrors(fe);
      }
    } finally {
      setPending(false);
    }
  }

  return (
    <form onSubmit={submit} aria-label={editing ? `Revise version ${editing.number}` : "Create a draft interval version"} className="space-y-3">
      {editing ? <p className="text-sm font-medium text-ink-800">Revising draft version {editing.number}.</p> : null}
      <div className="overflow-x-auto rounded-md border border-ink-200">
        <table className={tableClass} aria-label="Method per partition">
          <thead className="bg-ink-50">
            <tr>
              <th scope="col" className={thClass}>Partition</th>
              <th scope="col" className={thClass}>Method</th>
              <th scope="col" className={thClass}>Limits ({analyte.unit})</th>
              <th scope="col" className={thClass}>90% CIs</th>
              <th scope="col" className={thClass}>n</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100 bg-white">
            {partitions.map((p) => {
              const k = partitionKey(p);
              const e = latest.get(k);
              const label = partitionLabel(p);
              if (!e) {
                return (
                  <tr key={k}>
                    <td className={tdClass}>{label}</td>
                    <td className={`${tdClass} text-ink-600`} colSpan={4}>Not estimated yet: estimate it above, or it is left out of the draft.</td>
                  </tr>
                );
              }
              const m = methodOf(p);
              const l = e[m];
              return (
                <tr key={k}>
                  <td className={tdClass}>{label}</td>
                  <td className={tdClass}>
                    <label htmlFor={`method-${k}`} className="sr-only">Method for {label}</label>
                    <select id={`method-${k}`} className={inputClass} value={m} onChange={(ev) => setPicked({ ...picked, [k]: ev.target.value as EstimateMethod })}>
                      {(["nonparametric", "parametric", "robust"] as const)
                        .filter((x) => hasLimits(e[x]))
                        .map((x) => (
                          <option key={x} value={x}>
                            {METHOD_WORDS[x]}
                            {x === e.recommended ? " (recommended)" : ""}
                          </option>
                        ))}
                    </select>
                  </td>
                  <td className={`${tdClass} whitespace-nowrap`}>{formatValue(l.lower, d)} – {formatValue(l.upper, d)}</td>
                  <td className={`${tdClass} whitespace-nowrap text-ink-700`}>{formatCi(l.lowerCi, d)}; {formatCi(l.upperCi, d)}</td>
                  <td className={tdClass}>{e.n}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <div className="grid gap-3 md:grid-cols-[10rem_10rem_1fr]">
        <div className="space-y-1">
          <label htmlFor="critical-low" className={labelClass}>Critical low ({analyte.unit})</label>
          <input id="critical-low" className={inputClass} inputMode="decimal" value={criticalLow} onChange={(e) => setCriticalLow(e.target.value)} aria-invalid={fieldErrors.criticalLow ? true : undefined} aria-describedby={fieldErrors.criticalLow ? "critical-low-error" : undefined} />
          {fieldErrors.criticalLow ? <p id="critical-low-error" className="text-xs text-signal-high">{fieldErrors.criticalLow}</p> : null}
        </div>
        <div className="space-y-1">
          <label htmlFor="critical-high" className={labelClass}>Critical high ({analyte.unit})</label>
          <input id="critical-high" className={inputClass} inputMode="decimal" value={criticalHigh} onChange={(e) => setCriticalHigh(e.target.value)} aria-invalid={fieldErrors.criticalHigh ? true : undefined} aria-describedby={fieldErrors.criticalHigh ? "critical-high-error" : undefined} />
          {fieldErrors.criticalHigh ? <p id="critical-high-error" className="text-xs text-signal-high">{fieldErrors.criticalHigh}</p> : null}
        </div>
        <div className="space-y-1">
          <label htmlFor="draft-note" className={labelClass}>Note for the director</label>
          <textarea id="draft-note" rows={2} className={inputClass} value={note} onChange={(e) => setNote(e.target.value)} placeholder="What changed and why" />
        </div>
      </div>
      <p className="text-xs text-ink-500">The critical limits start as the analyte&apos;s; they are signed with the version. The draft stays editable until it is submitted.</p>
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={pending}>{pending ? "Saving…" : editing ? `Save version ${editing.number}` : "Create draft version"}</Button>
        {editing ? <Button type="button" variant="secondary" onClick={onCancel}>Cancel</Button> : null}
      </div>
      <ErrorNotice error={error} action={editing ? "The draft was not revised" : "No draft was created"} />
    </form>
  );
}

function VersionCard({ version: v, title, action, highlight = false }: { version: IntervalVersion; title: string; action?: ReactNode; highlight?: boolean }) {
  const d = v.decimals;
  return (
    <div className={`space-y-2 rounded-md border p-3 ${highlight ? "border-tide-500 bg-tide-50/40" : "border-ink-200"}`} data-testid={`version-${v.number}`}>
      <div className="flex flex-wrap items-baseline justify-between gap-2">
        <p className="text-sm">
          <strong>{title}</strong> · state <strong>{STATE_WORDS[v.state] ?? v.state}</strong> · {v.analyte.code} in {v.unit} · drafted{" "}
          {formatIsoDate(v.createdAt, true)}
          {v.createdBy ? ` by ${v.createdBy.name}` : ""}
        </p>
        <div className="flex flex-wrap items-center gap-2">
          <a href={`/versions/${v.id}`} className="text-sm font-medium" data-testid={`open-version-${v.number}`}>
            Review and submit version {v.number}
          </a>
          {action}
        </div>
      </div>
      <div className="overflow-x-auto">
        <table className={tableClass} aria-label={`${title}: partitions`}>
          <thead>
            <tr>
              <th scope="col" className={thClass}>Partition</th>
              <th scope="col" className={thClass}>Lower ({v.unit})</th>
              <th scope="col" className={thClass}>90% CI</th>
              <th scope="col" className={thClass}>Upper ({v.unit})</th>
              <th scope="col" className={thClass}>90% CI</th>
              <th scope="col" className={thClass}>Method</th>
              <th scope="col" className={thClass}>n</th>
              <th scope="col" className={thClass}>Scoring model</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-100">
            {v.partitions.map((p) => (
              <tr key={p.id}>
                <td className={tdClass}>{versionPartitionLabel(p)}</td>
                <td className={tdClass}>{formatValue(p.low, d)}</td>
                <td className={`${tdClass} whitespace-nowrap`}>{formatCi(p.lowCi, d)}</td>
                <td className={tdClass}>{formatValue(p.high, d)}</td>
                <td className={`${tdClass} whitespace-nowrap`}>{formatCi(p.highCi, d)}</td>
                <td className={tdClass}>{METHOD_WORDS[p.method] ?? p.method}</td>
                <td className={tdClass}>{p.n}</td>
                <td className={tdClass}>{modelWords(p.model)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="text-xs text-ink-600">
        Critical limits: {v.criticalLow === null && v.criticalHigh === null ? "none" : `${formatValue(v.criticalLow, d)} and ${formatValue(v.criticalHigh, d)}`}
        {v.note ? ` · Note: ${v.note}` : ""}
      </p>
    </div>
  );
}
