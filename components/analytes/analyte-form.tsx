"use client";

import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";
import type { FormServerAction } from "@/lib/auth/action-state";
import type { AnalyteField } from "./analyte-row";

const SPECIMENS = ["serum", "plasma", "serum or plasma", "whole blood", "urine", "cerebrospinal fluid"];

/**
 * Adds an analyte, or edits one when `initial` is given (the code then stays as it is). What the
 * person typed survives an error answer; each field shows its own message.
 */
export function AnalyteForm({
  action,
  initial,
  onCancel,
}: {
  action: FormServerAction;
  initial?: Record<AnalyteField, string>;
  onCancel?: () => void;
}) {
  const editing = initial !== undefined;
  const [state, onSubmit, pending] = useFormAction(action, { resetOnSuccess: !editing });
  const errors = state.status === "error" ? state.fieldErrors ?? {} : {};
  const field = (name: AnalyteField) => ({ name, id: `${editing ? "edit" : "new"}-${name}`, defaultValue: initial?.[name], error: errors[name] });
  return (
    <form onSubmit={onSubmit} className="space-y-3" aria-label={editing ? `Edit ${initial.code}` : "New analyte"} noValidate>
      {editing ? (
        <>
          <input type="hidden" name="code" value={initial.code} />
          <p className="text-sm text-ink-600">
            Code <span className="font-mono font-semibold text-ink-900">{initial.code}</span> (a code never changes; add a new analyte for a new code)
          </p>
        </>
      ) : (
        <TextField label="Code" {...field("code")} required autoComplete="off" hint="Capital letters or digits, e.g. GLU, K, ALP." />
      )}
      <TextField label="Name" {...field("name")} required autoComplete="off" />
      <div className="grid grid-cols-2 gap-3">
        <TextField label="Unit (UCUM)" {...field("unit")} required autoComplete="off" hint="Case-sensitive: mmol/L, umol/L, U/L, mg/dL." />
        <TextField label="Display decimals" {...field("decimals")} type="number" min={0} max={6} step={1} required defaultValue={initial?.decimals ?? "1"} />
      </div>
      <div className="grid grid-cols-2 gap-3">
        <TextField label="LOINC code" {...field("loinc")} autoComplete="off" hint="Optional, e.g. 2345-7." />
        <TextField label="Specimen" {...field("specimen")} list="specimen-types" defaultValue={initial?.specimen ?? "serum"} required />
        <datalist id="specimen-types">
          {SPECIMENS.map((s) => (
            <option key={s} value={s} />
          ))}
        </datalist>
      </div>
      <div className="grid grid-cols-2 gap-3">
        <TextField label="Critical low" {...field("criticalLow")} inputMode="decimal" hint="Optional, in the analyte's unit." />
        <TextField label="Critical high" {...field("criticalHigh")} inputMode="decimal" hint="Optional; above the low limit." />
      </div>
      <TextField label="Review period (months)" {...field("reviewMonths")} type="number" min={1} max={120} step={1} defaultValue={initial?.reviewMonths ?? "24"} />
      <div className="grid grid-cols-2 gap-3">
        <TextField label="Molar mass (g/mol)" {...field("molarMass")} inputMode="decimal" hint="Optional, for mass ↔ substance conversion." />
        <TextField label="Source of the molar mass" {...field("molarMassSource")} autoComplete="off" hint="Required with a molar mass." />
      </div>
      <StatusMessage state={state} />
      <div className="flex gap-2">
        <Button type="submit" disabled={pending}>
          {pending ? "Saving…" : editing ? `Save ${initial.code}` : "Add analyte"}
        </Button>
        {onCancel ? (
          <Button type="button" variant="secondary" onClick={onCancel}>
            {editing ? "Close" : "Cancel"}
          </Button>
        ) : null}
      </div>
    </form>
  );
}
