"use client";

import { useState } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { fetchJson, sendJson } from "../analysis/api";
import { AnalysisSection, DoneNotice, EmptyState, ErrorNotice, inputClass, labelClass } from "../analysis/feedback";
import type { SectionAnalyte, SectionStudy } from "../analysis/types";
import { useLmsFits } from "./age-curves-panel";
import { ageWords, fitSexWords } from "./types";

interface DraftVersion {
  id: string;
  number: number;
  state: string;
  studyId: string | null;
  partitions: { sex: "F" | "M" | null; ageFrom: number | null; ageTo: number | null; method: string; n: number }[];
}

/**
 * Step 3 of an age-curve study: a draft interval version whose partitions hold the chosen fits'
 * curves (scoring model lms; the limits follow the patient's exact age). One fit of both sexes,
 * or one fit of each sex.
 */
export function AgeCurveDraftPanel({ study, analyte }: { study: SectionStudy; analyte: SectionAnalyte }) {
  const { fits } = useLmsFits(study.id);
  const versionsKey = `/api/v1/interval-versions?analyte=${encodeURIComponent(analyte.code)}&state=draft`;
  const versions = useSWR<{ items: DraftVersion[] }>(versionsKey, fetchJson);
  const drafts = (versions.data?.items ?? []).filter((v) => v.studyId === study.id);
  const [chosen, setChosen] = useState<string[] | null>(null);
  const [note, setNote] = useState("");
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);
  const [created, setCreated] = useState<DraftVersion | null>(null);
  // By default the newest fit of both sexes, else the newest of each sex.
  const defaults = (() => {
    const both = fits.find((f) => f.options.sex === null);
    if (both) return [both.id];
    return (["F", "M"] as const).map((s) => fits.find((f) => f.options.sex === s)?.id).filter((id): id is string => !!id);
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
        partitions: selection.map((estimate) => ({ estimate, method: "lms" })),
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
        ? "Fit the curves first (step 2)."
        : drafts.length > 0
          ? "Open the draft to check it and submit it for sign-off."
          : "Choose the fits the version holds and create the draft.",
  };

  return (
    <AnalysisSection id="draft" step={3} title="Draft" state={state}>
      {fits.length === 0 ? (
        <EmptyState title="Nothing to draft yet" testId="age-curve-draft-empty">
          <p>
            Fit the curves under <a href="#age-curves" className="underline">Age curves</a>; the draft takes its partitions from the fits.
          </p>
        </EmptyState>
      ) : open ? (
        <form onSubmit={draft} className="space-y-3" aria-label="Draft a version from the curves">
          <fieldset className="space-y-1">
            <legend className={labelClass}>Fits the version holds</legend>
            {fits.map((f) => (
              <label key={f.id} className="flex items-center gap-2 text-sm">
                <input type="checkbox" checked={selection.includes(f.id)} onChange={() => toggle(f.id)} />
                {fitSexWords(f.options.sex)} · n = {f.n.toLocaleString("en")} · seed {f.options.seed} · fitted {f.createdAt.slice(0, 16).replace("T", " ")}
              </label>
            ))}
            <p className="text-xs text-ink-600">
              One fit of both sexes, or one fit of each sex: every child must fall under one set of curves. Each partition covers its donors&apos; ages;
              scoring reads the limits at the patient&apos;s exact age.
            </p>
          </fieldset>
          <div className="space-y-1">
            <label htmlFor="age-curve-note" className={labelClass}>
              Note for the director (optional)
            </label>
            <textarea id="age-curve-note" rows={2} className={inputClass} value={note} onChange={(e) => setNote(e.target.value)} />
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
          with {created.partitions.length} partition{created.partitions.length === 1 ? "" : "s"} of LMS curves (
          {created.partitions.map((p) => `${fitSexWords(p.sex).toLowerCase()}, ${ageWords(p.ageFrom ?? 0)} to ${ageWords(p.ageTo ?? 0)}`).join("; ")}).
        </DoneNotice>
      ) : null}
      {drafts.length > 0 ? (
        <ul className="space-y-1 text-sm" data-testid="age-curve-drafts">
          {drafts.map((v) => (
            <li key={v.id}>
              <a href={`/versions/${v.id}`} className="underline">Version {v.number}</a> · {v.partitions.map((p) => `${fitSexWords(p.sex)} (${p.method}, n = ${p.n})`).join("; ")}
            </li>
          ))}
        </ul>
      ) : null}
    </AnalysisSection>
  );
}
