"use client";

import { useState } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { fetchJson, sendJson } from "../analysis/api";
import { AnalysisSection, DoneNotice, EmptyState, ErrorNotice, inputClass, labelClass } from "../analysis/feedback";
import type { SectionAnalyte, SectionStudy } from "../analysis/types";
import { formatValue } from "@/lib/format";
import { useIndirectEstimates } from "./indirect-panel";
import { indirectPartitionWords } from "./types";

interface DraftVersion {
  id: string;
  number: number;
  state: string;
  studyId: string | null;
  partitions: { sex: "F" | "M" | null; ageFrom: number | null; ageTo: number | null; method: string; n: number }[];
}

/**
 * Step 3 of an indirect study: a draft interval version whose partitions take the chosen indirect
 * estimates' limits (method indirect; scored by the fitted non-diseased distribution, with the
 * caution that the interval was estimated indirectly). The partitions must not overlap.
 */
export function IndirectDraftPanel({ study, analyte }: { study: SectionStudy; analyte: SectionAnalyte }) {
  const { items: fits } = useIndirectEstimates(study.id);
  const versionsKey = `/api/v1/interval-versions?analyte=${encodeURIComponent(analyte.code)}&state=draft`;
  const versions = useSWR<{ items: DraftVersion[] }>(versionsKey, fetchJson);
  const drafts = (versions.data?.items ?? []).filter((v) => v.studyId === study.id);
  const [chosen, setChosen] = useState<string[] | null>(null);
  const [note, setNote] = useState("");
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);
  const [created, setCreated] = useState<DraftVersion | null>(null);
  // By default the newest estimate of each partition.
  const defaults = (() => {
    const seen = new Set<string>();
    return fits
      .filter((f) => {
        const key = JSON.stringify(f.partition);
        if (seen.has(key) || f.indirect.lower === null || f.indirect.upper === null) return false;
        seen.add(key);
        return true;
      })
      .map((f) => f.id);
  })();
  const selection = chosen ?? defaults;
  const open = study.status === "open";

  function toggle(id: string) {
    setChosen(selection.includes(id) ? selection.filter((x) => x !== id) : [...selection, id]);
  }

  async function draft(event: React.FormEvent) {
    event.preventDefault();
    setPending(true);
    setError(null);
    try {
      const version = await sendJson<DraftVersion>("POST", "/api/v1/interval-versions", {
        analyte: analyte.code,
        study: study.id,
        partitions: selection.map((estimate) => ({ estimate, method: "indirect" })),
        ...(note.trim() ? { note: note.trim() } : {}),
      });
      setCreated(version);
      await versions.mutate();
    } catch (err) {
      setError(err);
    } finally {
      setPending(false);
    }
  }

  const state = {
    done: drafts.length > 0 ? `${drafts.length} draft version${drafts.length === 1 ? "" : "s"} from this study.` : "No draft yet.",
    next:
      fits.length === 0
        ? "Estimate first (step 2)."
        : drafts.length > 0
          ? "Open the draft to check it and submit it for sign-off."
          : "Choose the estimates the version holds and create the draft.",
  };

  return (
    <AnalysisSection id="draft" step={3} title="Draft" state={state}>
      {fits.length === 0 ? (
        <EmptyState title="Nothing to draft yet" testId="indirect-draft-empty">
          <p>
            Estimate under <a href="#indirect" className="underline">Clean and estimate</a>; the draft takes its partitions from the estimates.
          </p>
        </EmptyState>
      ) : open ? (
        <form onSubmit={draft} className="space-y-3" aria-label="Draft a version from the indirect estimates">
          <fieldset className="space-y-1">
            <legend className={labelClass}>Estimates the version holds</legend>
            {fits.map((f) => (
              <label key={f.id} className="flex items-center gap-2 text-sm">
                <input type="checkbox" checked={selection.includes(f.id)} onChange={() => toggle(f.id)} />
                {indirectPartitionWords(f.partition)} · {formatValue(f.indirect.lower, analyte.decimals)}–{formatValue(f.indirect.upper, analyte.decimals)}{" "}
                {analyte.unit} · n = {f.n.toLocaleString("en")} · made {f.createdAt.slice(0, 16).replace("T", " ")}
              </label>
            ))}
            <p className="text-xs text-ink-600">
              One estimate per partition, the partitions not overlapping. The version names the indirect method; every score from it carries the
              caution that the interval was estimated from routine results.
            </p>
          </fieldset>
          <div className="space-y-1">
            <label htmlFor="indirect-note" className={labelClass}>
              Note for the director (optional)
            </label>
            <textarea id="indirect-note" rows={2} className={inputClass} value={note} onChange={(e) => setNote(e.target.value)} />
          </div>
          <Button type="submit" disabled={pending || selection.length === 0}>
            {pending ? "Drafting…" : "Create draft version"}
          </Button>
        </form>
      ) : null}
      <ErrorNotice error={error} action="Drafting the version" />
      {created ? (
        <DoneNotice>
          Drafted{" "}
          <a href={`/versions/${created.id}`} className="underline" data-testid={`open-version-${created.number}`}>
            version {created.number}
          </a>{" "}
          with {created.partitions.length} partition{created.partitions.length === 1 ? "" : "s"} estimated indirectly (
          {created.partitions.map((p) => indirectPartitionWords(p).toLowerCase()).join("; ")}).
        </DoneNotice>
      ) : null}
      {drafts.length > 0 ? (
        <ul className="space-y-1 text-sm" data-testid="indirect-drafts">
          {drafts.map((v) => (
            <li key={v.id}>
              <a href={`/versions/${v.id}`} className="underline">Version {v.number}</a> · {v.partitions.map((p) => `${indirectPartitionWords(p)} (${p.method}, n = ${p.n})`).join("; ")}
            </li>
          ))}
        </ul>
      ) : null}
    </AnalysisSection>
  );
}
