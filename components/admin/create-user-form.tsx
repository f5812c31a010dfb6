"use client";

import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";
import type { FormServerAction } from "@/lib/auth/action-state";
import { ROLE_OPTIONS } from "./role-options";

export function CreateUserForm({ action }: { action: FormServerAction }) {
  const [state, onSubmit, pending] = useFormAction(action, { resetOnSuccess: true });
  const errors = state.status === "error" ? state.fieldErrors ?? {} : {};
  return (
    <form onSubmit={onSubmit} className="max-w-md space-y-3" aria-label="New user">
      <TextField label="Full name" name="name" required error={errors.name} />
      <TextField label="E-mail" name="email" type="email" required error={errors.email} />
      <SelectField label="Role" name="role" options={ROLE_OPTIONS} defaultValue="clinician" error={errors.role} />
      <TextField
        label="Initial password"
        name="password"
        type="password"
        autoComplete="new-password"
        required
        error={errors.password}
        hint="At least 12 characters; the person must replace it with their own at the first sign-in."
      />
      <StatusMessage state={state} />
      <Button type="submit" disabled={pending}>
        {pending ? "Creating…" : "Create user"}
      </Button>
    </form>
  );
}
