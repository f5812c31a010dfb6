"use client";

import { Button } from "@/components/ui/button";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";
import type { FormServerAction } from "@/lib/auth/action-state";
import { ValuesField } from "./values-field";

/** The second set of 20 values, for a check whose first set asked for it. */
export function SecondSetForm({ action, checkId, unit }: { action: FormServerAction; checkId: string; unit: string }) {
  const [state, onSubmit, pending] = useFormAction(action);
  const errors = state.status === "error" ? state.fieldErrors ?? {} : {};
  return (
    <form onSubmit={onSubmit} className="space-y-3" aria-label="Second set" noValidate>
      <input type="hidden" name="id" value={checkId} />
      <ValuesField idPrefix="second" unit={unit} error={errors.values} label="20 more local healthy-donor values" />
      <StatusMessage state={state} />
      <Button type="submit" disabled={pending}>
        {pending ? "Checking…" : "Check the second set"}
      </Button>
    </form>
  );
}
