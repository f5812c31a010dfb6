"use client";

import { useState, type ReactNode } from "react";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { fetchJson, sendJson } from "./api";
import { AnalysisSection, DoneNotice, EmptyState, ErrorNotice, inputClass, labelClass } from "./feedback";
import type { SectionAnalyte, SectionStudy } from "./types";

/** A draft version as the Draft step lists it. */
export interface DraftVersion {
  id: string;
  number: number;
  state: string;
  studyId: string | null;
  partitions: { sex: "F" | "M" | null; ageFrom: number | null; ageTo: number | null; method: string; n: number }[];
}

/** What the step says, in the words of the study's kind. */
export interface DraftWords {
  /** "Next" while there is nothing to draft from. */
  first: string;
  /** "Next" when there is something to choose from. */
  choose: string;
  /** The form's accessible name and the legend of its choices. */
  form: string;
  legend: string;
  hint: ReactNode;
  /** The empty state's text. */
  empty: ReactNode;
  /** After "Drafted version N with": the partitions in words. */
  created: (version: DraftVersion) => ReactNode;
  /** One listed draft's partitions in words. */
  listed: (version: DraftVersion) => ReactNode;
}

/**
 * Step 3 of a study whose partitions come whole from its estimates (an age-curve study's fits, an
 * indirect study's estimates): the scientist ticks the estimates, adds a note, and drafts an
 * interval version with each estimate as a partition of `method`; the study's drafts are listed.
 */
export function ChosenEstimatesDraft({
  study,
  analyte,
  method,
  items,
  defaults,
  testPrefix,
  words,
}: {
  study: SectionStudy;
  analyte: SectionAnalyte;
  method: "lms" | "indirect";
  items: { id: string; label: ReactNode }[];
  /** The estimates ticked until the scientist changes the choice. */
  defaults: string[];
  /** Prefix of the step's test ids and field ids ("age-curve", "indirect"). */
  testPrefix: string;
  words: DraftWords;
}) {
  const versionsKey = `/api/v1/interval-versions?analyte=${encodeURIComponent(analyte.code)}&state=draft`;
  const versions = useSWR<{ items: DraftVersion[] }>(versionsKey, fetchJson);
  const drafts = (versions.data?.items ?? []).filter((v) => v.studyId === study.id);
  const [chosen, setChosen] = useState<string[] | null>(null);
  const [note, setNote] = useState("");
  const [pending, setPending] = useState(false);
  const [error, setError] = useState<unknown>(null);
  const [created, setCreated] = useState<DraftVersion | null>(null);
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
        partitions: selection.map((estimate) => ({ estimate, method })),
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
    next: items.length === 0 ? words.first : drafts.length > 0 ? "Open the draft to check it and submit it for sign-off." : words.choose,
  };

  return (
    <AnalysisSection id="draft" step={3} title="Draft" state={state}>
      {items.length === 0 ? (
        <EmptyState title="Nothing to draft yet" testId={`${testPrefix}-draft-empty`}>
          <p>{words.empty}</p>
        </EmptyState>
      ) : open ? (
        <form onSubmit={draft} className="space-y-3" aria-label={words.form}>
          <fieldset className="space-y-1">
            <legend className={labelClass}>{words.legend}</legend>
            {items.map((item) => (
              <label key={item.id} className="flex items-center gap-2 text-sm">
                <input type="checkbox" checked={selection.includes(item.id)} onChange={() => toggle(item.id)} />
                {item.label}
              </label>
            ))}
            <p className="text-xs text-ink-600">{words.hint}</p>
          </fieldset>
          <div className="space-y-1">
            <label htmlFor={`${testPrefix}-note`} className={labelClass}>
              Note for the director (optional)
            </label>
            <textarea id={`${testPrefix}-note`} rows={2} className={inputClass} value={note} onChange={(e) => setNote(e.target.value)} />
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
          with {words.created(created)}
        </DoneNotice>
      ) : null}
      {drafts.length > 0 ? (
        <ul className="space-y-1 text-sm" data-testid={`${testPrefix}-drafts`}>
          {drafts.map((v) => (
            <li key={v.id}>
              <a href={`/versions/${v.id}`} className="underline">Version {v.number}</a> · {words.listed(v)}
            </li>
          ))}
        </ul>
      ) : null}
    </AnalysisSection>
  );
}
