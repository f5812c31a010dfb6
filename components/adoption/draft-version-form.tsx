"use client";

import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";
import type { FormServerAction } from "@/lib/auth/action-state";

/** Drafts an interval version from an accepted check: one partition with the check's limits. */
export function DraftVersionForm({ action, checkId, analyte, scoring }: { action: FormServerAction; checkId: string; analyte: string; scoring: string }) {
  const [state, onSubmit, pending] = useFormAction(action);
  return (
    <form onSubmit={onSubmit} className="space-y-3" aria-label="Draft a version" noValidate>
      <input type="hidden" name="id" value={checkId} />
      <input type="hidden" name="analyte" value={analyte} />
      <p className="text-sm text-ink-700">{scoring}</p>
      <TextField label="Note (optional)" name="note" id="draft-note" autoComplete="off" hint="Kept with the version, e.g. why this interval was adopted." />
      <StatusMessage state={state} />
      <Button type="submit" disabled={pending}>
        {pending ? "Drafting…" : "Draft a version from this check"}
      </Button>
    </form>
  );
}
