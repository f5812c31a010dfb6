"use client";

import { useRouter } from "next/navigation";
import { useId, useMemo, useState, type FormEvent } from "react";
import useSWR from "swr";
import { StripChart } from "@/components/charts/strip-chart";
import { Button } from "@/components/ui/button";
import { formatIsoDate, formatValue } from "@/lib/format";
import { ApiError, fetchJson, sendJson, studyApi } from "./api";
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
import { cleanPartition, partitionKey, partitionLabel, partitionQuery, partitionsOfPlan } from "./partitions";
import type { ExclusionItem, OutlierDecision, Partition, ScreenProposal, ScreenResult, ScreenRule, SectionProps } from "./types";

const RULES: { value: ScreenRule; label: string }[] = [
  { value: "horn", label: "Horn (Tukey fences on the Box-Cox scale)" },
  { value: "dixon", label: "Dixon/Reed (D/R ≥ 1/3)" },
  { value: "tukey", label: "Tukey fences (raw scale)" },
];

const RULE_WORDS: Record<string, string> = { horn: "Horn", dixon: "Dixon/Reed", tukey: "Tukey" };

function partitionChoices(plan: SectionProps["study"]["partitionPlan"]): Partition[] {
  const all: Partition[] = [{}, { sex: "F" }, { sex: "M" }, ...(plan ? partitionsOfPlan(plan) : [])];
  const seen = new Set<string>();
  return all.filter((p) => {
    const k = partitionKey(p);
    if (seen.has(k)) return false;
    seen.add(k);
    return true;
  });
}

interface StripAnswer {
  n: number;
  censored: { below: number; above: number };
  points: { rank: number; value: number }[];
  thinned: boolean;
}

/** Screening: run an outlier screen, decide on each proposal, exclude by hand, undo. */
export function ScreeningPanel({ study, analyte }: SectionProps) {
  const api = studyApi(study.id);
  const closed = study.status === "closed";
  const choices = useMemo(() => partitionChoices(study.partitionPlan), [study.partitionPlan]);
  const [rule, setRule] = useState<ScreenRule>("horn");
  const [partitionAt, setPartitionAt] = useState(0);
  const [result, setResult] = useState<ScreenResult | null>(null);
  const [running, setRunning] = useState(false);
  const [screenError, setScreenError] = useState<unknown>(null);
  const decisions = useSWR<{ items: OutlierDecision[] }>(`${api}/outlier-decisions`, fetchJson);
  const exclusions = useSWR<{ items: ExclusionItem[] }>(`${api}/exclusions`, fetchJson);
  const screened = result ? cleanPartition(result.partition) : null;
  const strip = useSWR<StripAnswer>(screened ? `${api}/chart-data${partitionQuery(screened)}` : null, fetchJson);
  const fmt = (v: number) => formatValue(v, analyte.decimals);

  async function runScreen(event?: FormEvent) {
    event?.preventDefault();
    setRunning(true);
    setScreenError(null);
    try {
      const partition = cleanPartition(choices[partitionAt]);
      const body = Object.keys(partition).length > 0 ? { rule, partition } : { rule };
      setResult(await sendJson<ScreenResult>("POST", `${api}/screen`, body));
    } catch (e) {
      setScreenError(e);
    } finally {
      setRunning(false);
    }
  }

  const router = useRouter();
  function refreshLists() {
    // The page header counts exclusions on the server: refresh it with the lists.
    router.refresh();
    void decisions.mutate();
    void exclusions.mutate();
    void strip.mutate();
  }

  function setProposalDecision(donorResultId: number, decision: ScreenProposal["decision"]) {
    setResult((r) => (r ? { ...r, proposals: r.proposals.map((p) => (p.donorResultId === donorResultId ? { ...p, decision } : p)) } : r));
  }

  const excludedCount = exclusions.data?.items.length ?? 0;
  const decided = result?.proposals.filter((p) => p.decision).length ?? 0;
  const state: SectionState = {
    done:
        result
          ? `${RULE_WORDS[result.ruleApplied ?? result.rule]} screen of ${partitionLabel(result.partition)}: ${result.proposals.length} proposal${result.proposals.length === 1 ? "" : "s"}, ${decided} decided. ${excludedCount} exclusion${excludedCount === 1 ? "" : "s"} in effect.`
          : `${excludedCount} exclusion${excludedCount === 1 ? "" : "s"} in effect; no screen run on this page yet.`,
    next: result ? (decided < result.proposals.length ? "Decide on each proposal, with a reason." : "Assess the partitions in step 3.") : "Run a screen: Horn is the usual first choice.",
  };

  return (
    <AnalysisSection id="screening" title="Screening" step={2} state={state}>
      <p className="max-w-3xl text-sm text-ink-600">
        A screen only proposes outliers: nothing is excluded by the screen itself. Each proposal stays in the data until you
        exclude it here with a reason; every decision is recorded and can be undone while the study is open.
      </p>
      {closed ? <p className="text-sm text-ink-700">The study is closed: screening decisions and exclusions can no longer change.</p> : null}

      <form onSubmit={runScreen} aria-label="Run an outlier screen" className="flex flex-wrap items-end gap-3">
        <div className="min-w-56 space-y-1">
          <label htmlFor="screen-rule" className={labelClass}>
            Rule
          </label>
          <select id="screen-rule" className={inputClass} value={rule} onChange={(e) => setRule(e.target.value as ScreenRule)}>
            {RULES.map((r) => (
              <option key={r.value} value={r.value}>
                {r.label}
              </option>
            ))}
          </select>
        </div>
        <div className="min-w-48 space-y-1">
          <label htmlFor="screen-partition" className={labelClass}>
            Partition
          </label>
          <select id="screen-partition" className={inputClass} value={partitionAt} onChange={(e) => setPartitionAt(Number(e.target.value))}>
            {choices.map((p, i) => (
              <option key={partitionKey(p)} value={i}>
                {partitionLabel(p)}
              </option>
            ))}
          </select>
        </div>
        <Button type="submit" disabled={running || closed}>
          {running ? "Screening…" : result ? "Screen again" : "Run screen"}
        </Button>
      </form>
      <ErrorNotice error={screenError} action="The screen did not run" />

      {running && !result ? <Skeleton chart lines={3} label="Running the screen" /> : null}
      {result ? (
        <ScreenResultView
          result={result}
          strip={strip.data}
          stripError={strip.error}
          unit={analyte.unit}
          fmt={fmt}
          decimals={analyte.decimals}
          api={api}
          closed={closed}
          onDecided={(id, d) => {
            setProposalDecision(id, d);
            refreshLists();
          }}
        />
      ) : !running ? (
        <EmptyState title="No screen has been run on this page yet." testId="screening-empty">
          <p>Choose a rule (Horn is the usual first choice) and a partition, then run the screen to see its proposals.</p>
        </EmptyState>
      ) : null}

      <DecisionsList api={api} decisions={decisions} exclusions={exclusions.data?.items ?? []} closed={closed} fmt={fmt} onUndone={refreshLists} onUndo={(id) => setProposalDecision(id, null)} />
      <ExclusionsPanel api={api} exclusions={exclusions} closed={closed} fmt={fmt} unit={analyte.unit} onChanged={refreshLists} onUndo={(id) => setProposalDecision(id, null)} />
    </AnalysisSection>
  );
}

function ScreenResultView({
  result,
  strip,
  stripError,
  unit,
  fmt,
  decimals,
  api,
  closed,
  onDecided,
}: {
  result: ScreenResult;
  strip: StripAnswer | undefined;
  stripError: unknown;
  unit: string;
  fmt: (v: number) => string;
  decimals: number;
  api: string;
  closed: boolean;
  onDecided: (donorResultId: number, decision: ScreenProposal["decision"]) => void;
}) {
  const fellBack = result.ruleApplied && result.ruleApplied !== result.rule;
  return (
    <div className="space-y-4" data-testid="screen-result">
      <p className="text-sm text-ink-800">
        The {RULE_WORDS[result.ruleApplied ?? result.rule]} screen looked at {result.n} measured value{result.n === 1 ? "" : "s"} of{" "}
        {partitionLabel(result.partition)} and proposes{" "}
        <strong>
          {result.proposals.length === 0 ? "no outlier" : `${result.proposals.length} outlier${result.proposals.length === 1 ? "" : "s"}`}
        </strong>
        . Nothing has been excluded.
        {fellBack ? ` Horn's method needs positive values, so Tukey fences on the raw scale were used instead.` : ""}
      </p>
      {stripError ? <ErrorNotice error={stripError} action="The chart could not be loaded" /> : null}
      {strip ? (
        <StripChart
          points={strip.points}
          n={strip.n}
          thinned={strip.thinned}
          proposals={result.proposals.map((p) => ({ donorCode: p.donorCode, value: p.value }))}
          unit={unit}
          decimals={decimals}
          partitionWords={partitionLabel(result.partition)}
        />
      ) : !stripError ? (
        <Skeleton chart lines={0} label="Loading the chart" />
      ) : null}
      {result.proposals.length > 0 ? (
        <div className="overflow-x-auto rounded-md border border-ink-200">
          <table className={tableClass} aria-label="Outlier proposals">
            <thead className="bg-ink-50">
              <tr>
                <th scope="col" className={thClass}>Donor</th>
                <th scope="col" className={thClass}>Sex, age</th>
                <th scope="col" className={thClass}>Value ({unit})</th>
                <th scope="col" className={thClass}>Why proposed</th>
                <th scope="col" className={thClass}>Decision</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100 bg-white">
              {result.proposals.map((p) => (
                <ProposalRow key={p.donorResultId} proposal={p} api={api} rule={result.ruleApplied ?? result.rule} closed={closed} fmt={fmt} onDecided={onDecided} />
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </div>
  );
}

function ProposalRow({
  proposal,
  api,
  rule,
  closed,
  fmt,
  onDecided,
}: {
  proposal: ScreenProposal;
  api: string;
  rule: string;
  closed: boolean;
  fmt: (v: number) => string;
  onDecided: (donorResultId: number, decision: ScreenProposal["decision"]) => void;
}) {
  const id = useId();
  const [reason, setReason] = useState("");
  const [missingReason, setMissingReason] = useState(false);
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);

  async function decide(decision: "exclude" | "keep") {
    if (!reason.trim()) {
      setMissingReason(true);
      return;
    }
    setMissingReason(false);
    setPending(true);
    setError(null);
    try {
      const d = await sendJson<OutlierDecision>("POST", `${api}/outlier-decisions`, {
        donorResultId: proposal.donorResultId,
        decision,
        reason: reason.trim(),
        rule,
      });
      onDecided(proposal.donorResultId, { id: d.id, decision: d.decision, reason: d.reason, decidedAt: d.decidedAt });
    } catch (e) {
      setError(e);
    } finally {
      setPending(false);
    }
  }

  async function undo() {
    if (!proposal.decision) return;
    setPending(true);
    setError(null);
    try {
      await sendJson("DELETE", `${api}/outlier-decisions/${proposal.decision.id}`);
      onDecided(proposal.donorResultId, null);
    } catch (e) {
      setError(e);
    } finally {
      setPending(false);
    }
  }

  return (
    <tr data-testid={`proposal-${proposal.donorCode}`}>
      <td className={`${tdClass} font-mono`}>{proposal.donorCode}</td>
      <td className={`${tdClass} whitespace-nowrap`}>
        {proposal.sex}, {Math.floor(proposal.ageYears)} y
      </td>
      <td className={`${tdClass} whitespace-nowrap font-medium`}>
        <span aria-hidden className="mr-1 text-[#b45309]">△</span>
        {fmt(proposal.value)}
      </td>
      <td className={`${tdClass} max-w-sm text-ink-700`}>{proposal.explanation}</td>
      <td className={`${tdClass} min-w-72`}>
        {proposal.decision ? (
          <div className="space-y-1">
            <p>
              <strong>{proposal.decision.decision === "exclude" ? "Excluded" : "Kept"}</strong>: {proposal.decision.reason}
            </p>
            <Button type="button" variant="secondary" className="px-2 py-1 text-xs" onClick={undo} disabled={pending || closed} aria-label={`Undo the decision on donor ${proposal.donorCode}`}>
              Undo
            </Button>
          </div>
        ) : (
          <div className="space-y-1.5">
            <label htmlFor={`${id}-reason`} className="sr-only">
              Reason for donor {proposal.donorCode}
            </label>
            <input
              id={`${id}-reason`}
              className={inputClass}
              placeholder="Reason (required)"
              value={reason}
              disabled={closed}
              onChange={(e) => setReason(e.target.value)}
              aria-invalid={missingReason || undefined}
              aria-describedby={missingReason ? `${id}-missing` : undefined}
            />
            {missingReason ? (
              <p id={`${id}-missing`} className="text-xs text-signal-high">
                Give a reason before you decide: it is kept with the decision.
              </p>
            ) : null}
            <div className="flex gap-2">
              <Button type="button" variant="danger" className="px-2 py-1 text-xs" disabled={pending || closed} onClick={() => decide("exclude")} aria-label={`Exclude donor ${proposal.donorCode}`}>
                Exclude
              </Button>
              <Button type="button" variant="secondary" className="px-2 py-1 text-xs" disabled={pending || closed} onClick={() => decide("keep")} aria-label={`Keep donor ${proposal.donorCode}`}>
                Keep
              </Button>
            </div>
          </div>
        )}
        <ErrorNotice error={error} />
      </td>
    </tr>
  );
}

function DecisionsList({
  api,
  decisions,
  exclusions,
  closed,
  fmt,
  onUndone,
  onUndo,
}: {
  api: string;
  decisions: { data?: { items: OutlierDecision[] }; error?: unknown; isLoading: boolean };
  exclusions: ExclusionItem[];
  closed: boolean;
  fmt: (v: number) => string;
  onUndone: () => void;
  onUndo: (donorResultId: number) => void;
}) {
  const [error, setError] = useState<unknown>(null);
  const [pending, setPending] = useState<string | null>(null);
  const byResult = new Map(exclusions.map((e) => [e.donorResultId, e]));
  async function undo(d: OutlierDecision) {
    setPending(d.id);
    setError(null);
    try {
      await sendJson("DELETE", `${api}/outlier-decisions/${d.id}`);
      onUndo(d.donorResultId);
      onUndone();
    } catch (e) {
      setError(e);
    } finally {
      setPending(null);
    }
  }
  const items = decisions.data?.items ?? [];
  return (
    <div className="space-y-2">
      <h3 className="text-sm font-semibold text-ink-800">Decisions on proposals</h3>
      {decisions.error ? <ErrorNotice error={decisions.error} action="The decisions could not be loaded" /> : null}
      {decisions.isLoading ? <Skeleton lines={2} /> : null}
      {decisions.data && items.length === 0 ? <p className="text-sm text-ink-600">No decision taken yet: decide on the proposals of a screen above.</p> : null}
      {items.length > 0 ? (
        <ul className="divide-y divide-ink-100 rounded-md border border-ink-200" aria-label="Decisions on proposals">
          {items.map((d) => {
            const ex = byResult.get(d.donorResultId);
            return (
              <li key={d.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2 text-sm">
                <span>
                  <strong>{d.decision === "exclude" ? "Excluded" : "Kept"}</strong>{" "}
                  {ex ? <>donor <span className="font-mono">{ex.donorCode}</span> ({fmt(ex.value)})</> : <>donor result #{d.donorResultId}</>} after the{" "}
                  {RULE_WORDS[d.rule] ?? d.rule} screen: {d.reason}{" "}
                  <span className="text-ink-500">({formatIsoDate(d.decidedAt, true)})</span>
                </span>
                <Button type="button" variant="secondary" className="px-2 py-1 text-xs" disabled={closed || pending === d.id} onClick={() => undo(d)}>
                  Undo
                </Button>
              </li>
            );
          })}
        </ul>
      ) : null}
      <ErrorNotice error={error} action="The decision was not undone" />
    </div>
  );
}

function ExclusionsPanel({
  api,
  exclusions,
  closed,
  fmt,
  unit,
  onChanged,
  onUndo,
}: {
  api: string;
  exclusions: { data?: { items: ExclusionItem[] }; error?: unknown; isLoading: boolean };
  closed: boolean;
  fmt: (v: number) => string;
  unit: string;
  onChanged: () => void;
  onUndo: (donorResultId: number) => void;
}) {
  const [who, setWho] = useState("");
  const [reason, setReason] = useState("");
  const [fieldErrors, setFieldErrors] = useState<{ who?: string; reason?: string }>({});
  const [error, setError] = useState<unknown>(null);
  const [done, setDone] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  const [undoing, setUndoing] = useState<string | null>(null);

  async function exclude(event: FormEvent) {
    event.preventDefault();
    setDone(null);
    setError(null);
    const tokens = [...new Set(who.split(/[\s,;]+/).map((t) => t.trim()).filter(Boolean))];
    const errors: { who?: string; reason?: string } = {};
    if (tokens.length === 0) errors.who = "Name at least one donor code or donor result id.";
    if (!reason.trim()) errors.reason = "Give the reason for the exclusion: it is kept with it.";
    setFieldErrors(errors);
    if (errors.who || errors.reason) return;
    setPending(true);
    try {
      const found = await fetchJson<{ items: { id: number; donorCode: string }[]; missing: string[] }>(
        `${api}/donor-results/lookup?codes=${encodeURIComponent(tokens.join(","))}`,
      );
      const ids = found.items.map((i) => i.id);
      const unknown: string[] = [];
      for (const t of found.missing) {
        if (/^#?\d+$/.test(t)) ids.push(Number(t.replace("#", "")));
        else unknown.push(t);
      }
      if (unknown.length > 0) {
        setFieldErrors({ who: `No donor result of this study has the code${unknown.length === 1 ? "" : "s"} ${unknown.join(", ")}. Check the codes against the donor results table.` });
        return;
      }
      const answer = await sendJson<{ items: ExclusionItem[] }>("POST", `${api}/exclusions`, { donorResultIds: [...new Set(ids)], reason: reason.trim() });
      setDone(`Excluded ${answer.items.length} donor result${answer.items.length === 1 ? "" : "s"}.`);
      setWho("");
      setReason("");
      onChanged();
    } catch (e) {
      setError(e);
      if (e instanceof ApiError && e.status === 422 && /reason/i.test(e.message)) setFieldErrors({ reason: e.message });
    } finally {
      setPending(false);
    }
  }

  async function undo(ex: ExclusionItem) {
    setUndoing(ex.id);
    setError(null);
    setDone(null);
    try {
      await sendJson("DELETE", `${api}/exclusions/${ex.id}`);
      setDone(`The exclusion of donor ${ex.donorCode} is undone: the result counts again.`);
      onUndo(ex.donorResultId);
      onChanged();
    } catch (e) {
      setError(e);
    } finally {
      setUndoing(null);
    }
  }

  const items = exclusions.data?.items ?? [];
  return (
    <div className="space-y-3">
      <h3 className="text-sm font-semibold text-ink-800">Exclusions in effect</h3>
      {exclusions.error ? <ErrorNotice error={exclusions.error} action="The exclusions could not be loaded" /> : null}
      {exclusions.isLoading ? <Skeleton lines={2} /> : null}
      {exclusions.data && items.length === 0 ? (
        <p className="text-sm text-ink-600">No donor result is excluded: every result counts in the partitions and estimates.</p>
      ) : null}
      {items.length > 0 ? (
        <div className="overflow-x-auto rounded-md border border-ink-200">
          <table className={tableClass} aria-label="Exclusions in effect">
            <thead className="bg-ink-50">
              <tr>
                <th scope="col" className={thClass}>Donor</th>
                <th scope="col" className={thClass}>Sex, age</th>
                <th scope="col" className={thClass}>Value ({unit})</th>
                <th scope="col" className={thClass}>How</th>
                <th scope="col" className={thClass}>Reason</th>
                <th scope="col" className={thClass}>By, on</th>
                <th scope="col" className={thClass}><span className="sr-only">Undo</span></th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-100 bg-white">
              {items.map((ex) => (
                <tr key={ex.id}>
                  <td className={`${tdClass} font-mono`}>{ex.donorCode}</td>
                  <td className={`${tdClass} whitespace-nowrap`}>{ex.sex}, {Math.floor(ex.ageYears)} y</td>
                  <td className={tdClass}>{fmt(ex.value)}</td>
                  <td className={`${tdClass} whitespace-nowrap`}>{ex.source === "outlier" ? `Outlier (${RULE_WORDS[ex.rule ?? ""] ?? ex.rule})` : "By hand"}</td>
                  <td className={`${tdClass} max-w-xs`}>{ex.reason}</td>
                  <td className={`${tdClass} whitespace-nowrap text-ink-600`}>{ex.createdBy?.name ?? "—"}, {formatIsoDate(ex.createdAt)}</td>
                  <td className={tdClass}>
                    <Button type="button" variant="secondary" className="px-2 py-1 text-xs" disabled={closed || undoing === ex.id} onClick={() => undo(ex)} aria-label={`Undo the exclusion of donor ${ex.donorCode}`}>
                      Undo
                    </Button>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}

      <form onSubmit={exclude} aria-label="Exclude donor results by hand" className="grid gap-3 rounded-md border border-ink-200 bg-ink-50/60 p-3 md:grid-cols-[1fr_1fr_auto] md:items-start">
        <div className="space-y-1">
          <label htmlFor="manual-who" className={labelClass}>Donor codes or result ids</label>
          <input id="manual-who" className={inputClass} value={who} onChange={(e) => setWho(e.target.value)} placeholder="D0012, D0047 or #1834" aria-invalid={fieldErrors.who ? true : undefined} aria-describedby={fieldErrors.who ? "manual-who-error" : "manual-who-hint"} disabled={closed} />
          {fieldErrors.who ? <p id="manual-who-error" className="text-xs text-signal-high">{fieldErrors.who}</p> : <p id="manual-who-hint" className="text-xs text-ink-500">Separate several with commas or spaces.</p>}
        </div>
        <div className="space-y-1">
          <label htmlFor="manual-reason" className={labelClass}>Reason</label>
          <input id="manual-reason" className={inputClass} value={reason} onChange={(e) => setReason(e.target.value)} placeholder="e.g. haemolysed specimen" aria-invalid={fieldErrors.reason ? true : undefined} aria-describedby={fieldErrors.reason ? "manual-reason-error" : undefined} disabled={closed} />
          {fieldErrors.reason ? <p id="manual-reason-error" className="text-xs text-signal-high">{fieldErrors.reason}</p> : null}
        </div>
        <Button type="submit" variant="danger" className="md:mt-5" disabled={pending || closed}>
          {pending ? "Excluding…" : "Exclude by hand"}
        </Button>
      </form>
      <ErrorNotice error={error} action="The exclusions did not change" />
      <DoneNotice>{done}</DoneNotice>
    </div>
  );
}
