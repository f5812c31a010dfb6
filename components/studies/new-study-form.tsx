"use client";

import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";
import type { FormServerAction } from "@/lib/auth/action-state";
import type { StudyAnalyte } from "./types";

const area =
  "block w-full rounded-md border border-ink-300 bg-white px-2.5 py-1.5 text-sm text-ink-900 focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500 aria-[invalid=true]:border-signal-high";

/**
 * Opens a study for an analyte of the catalogue. The action sends the scientist to the new study;
 * on an error what was typed stays and each field shows its message.
 */
export function NewStudyForm({ action, analytes }: { action: FormServerAction; analytes: StudyAnalyte[] }) {
  const [state, onSubmit, pending] = useFormAction(action);
  const errors = state.status === "error" ? state.fieldErrors ?? {} : {};
  const options = [
    { value: "", label: "Choose the analyte…" },
    ...analytes.map((a) => ({ value: a.code, label: `${a.code} · ${a.name} (${a.unit})` })),
  ];
  return (
    <form onSubmit={onSubmit} className="space-y-3" aria-label="New study" noValidate>
      <SelectField label="Analyte" name="analyte" id="study-analyte" options={options} error={errors.analyte} required defaultValue="" />
      <TextField label="Title" name="title" id="study-title" error={errors.title} required autoComplete="off" hint="e.g. Fasting glucose, healthy adults 2026" />
      <fieldset className="space-y-1">
        <legend className="block text-xs font-medium uppercase tracking-wide text-ink-600">Kind of study</legend>
        <label className="flex items-start gap-2 text-sm text-ink-800">
          <input type="radio" name="kind" value="direct" defaultChecked className="mt-1" />
          <span>
            <span className="font-medium">Limits per partition</span>: one reference interval for everyone, or per sex or age band.
          </span>
        </label>
        <label className="flex items-start gap-2 text-sm text-ink-800">
          <input type="radio" name="kind" value="age_curve" className="mt-1" />
          <span>
            <span className="font-medium">Age curves (children)</span>: centile curves continuous in age (LMS); every donor needs a birth date and a
            collection date.
          </span>
        </label>
        <label className="flex items-start gap-2 text-sm text-ink-800">
          <input type="radio" name="kind" value="indirect" className="mt-1" />
          <span>
            <span className="font-medium">Indirect, from routine results</span>: limits separated statistically from the laboratory&apos;s own patient
            results (truncated maximum likelihood), after cleaning them; for partitions where healthy donors are hard to recruit.
          </span>
        </label>
        {errors.kind ? <p className="text-xs text-signal-high">{errors.kind}</p> : null}
      </fieldset>
      <TextField label="Method and instrument" name="method" id="study-method" error={errors.method} autoComplete="off" hint="e.g. Hexokinase on the chemistry analyser" />
      <TextField label="Specimen" name="specimen" id="study-specimen" error={errors.specimen} autoComplete="off" hint="Leave empty for the analyte's specimen." />
      <div className="space-y-1">
        <label htmlFor="study-criteria" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
          Reference individuals and exclusion criteria
        </label>
        <textarea
          id="study-criteria"
          name="criteria"
          rows={4}
          className={area}
          aria-invalid={errors.criteria ? true : undefined}
          aria-describedby="study-criteria-hint"
        />
        <p id="study-criteria-hint" className={`text-xs ${errors.criteria ? "text-signal-high" : "text-ink-500"}`}>
          {errors.criteria ?? "Who was recruited and who was left out, as written in the protocol."}
        </p>
      </div>
      <div className="grid grid-cols-2 gap-3">
        <TextField label="Collected from" name="collectedFrom" id="study-collected-from" type="date" error={errors.collectedFrom} />
        <TextField label="Collected to" name="collectedTo" id="study-collected-to" type="date" error={errors.collectedTo} />
      </div>
      <StatusMessage state={state} />
      <Button type="submit" disabled={pending}>
        {pending ? "Opening…" : "Open the study"}
      </Button>
    </form>
  );
}
