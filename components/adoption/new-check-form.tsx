"use client";

import { useState } from "react";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";
import type { FormServerAction } from "@/lib/auth/action-state";
import type { CheckAnalyte } from "./types";
import { ValuesField } from "./values-field";

const area =
  "block w-full rounded-md border border-ink-300 bg-white px-2.5 py-1.5 text-sm text-ink-900 focus:border-tide-500 focus:outline-none focus:ring-1 focus:ring-tide-500 aria-[invalid=true]:border-signal-high";

/**
 * Enters an external interval with its source and 20 local healthy-donor values; the action
 * records the check and goes to its decision. On an error what was typed stays.
 */
export function NewCheckForm({ action, analytes }: { action: FormServerAction; analytes: CheckAnalyte[] }) {
  const [state, onSubmit, pending] = useFormAction(action);
  const [code, setCode] = useState("");
  const unit = analytes.find((a) => a.code === code)?.unit ?? null;
  const errors = state.status === "error" ? state.fieldErrors ?? {} : {};
  const options = [
    { value: "", label: "Choose the analyte…" },
    ...analytes.map((a) => ({ value: a.code, label: `${a.code} · ${a.name} (${a.unit})` })),
  ];
  return (
    <form onSubmit={onSubmit} className="space-y-3" aria-label="New adoption check" noValidate>
      <SelectField
        label="Analyte"
        name="analyte"
        id="check-analyte"
        options={options}
        error={errors.analyte}
        value={code}
        onChange={(e) => setCode(e.target.value)}
      />
      <SelectField
        label="Sex"
        name="sex"
        id="check-sex"
        error={errors.sex}
        defaultValue=""
        options={[
          { value: "", label: "Both sexes" },
          { value: "F", label: "Women" },
          { value: "M", label: "Men" },
        ]}
      />
      <div className="grid grid-cols-2 gap-3">
        <TextField label={`Lower limit${unit ? ` (${unit})` : ""}`} name="lower" id="check-lower" inputMode="decimal" error={errors.lower} autoComplete="off" hint="Empty for an upper limit only." />
        <TextField label={`Upper limit${unit ? ` (${unit})` : ""}`} name="upper" id="check-upper" inputMode="decimal" error={errors.upper} autoComplete="off" hint="Empty for a lower limit only." />
      </div>
      <div className="space-y-1">
        <label htmlFor="check-source" className="block text-xs font-medium uppercase tracking-wide text-ink-600">
          Source of the interval
        </label>
        <textarea
          id="check-source"
          name="source"
          rows={2}
          className={area}
          aria-invalid={errors.source ? true : undefined}
          aria-describedby="check-source-hint"
        />
        <p id="check-source-hint" className={`text-xs ${errors.source ? "text-signal-high" : "text-ink-500"}`}>
          {errors.source ?? "The manufacturer's insert (product, lot, date) or the publication."}
        </p>
      </div>
      <ValuesField idPrefix="check" unit={unit} error={errors.values} label="Local healthy-donor values" />
      <StatusMessage state={state} />
      <Button type="submit" disabled={pending}>
        {pending ? "Checking…" : "Check the interval"}
      </Button>
    </form>
  );
}
