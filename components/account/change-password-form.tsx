"use client";

import { changeOwnPasswordAction } from "@/app/(workspace)/account/actions";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";

export function ChangePasswordForm() {
  const [state, onSubmit, pending] = useFormAction(changeOwnPasswordAction, { resetOnSuccess: true });
  const errors = state.status === "error" ? state.fieldErrors ?? {} : {};
  return (
    <form onSubmit={onSubmit} className="max-w-md space-y-3">
      <TextField label="Current password" name="current" type="password" autoComplete="current-password" error={errors.current} />
      <TextField label="New password" name="next" type="password" autoComplete="new-password" error={errors.next} hint="At least 12 characters." />
      <TextField label="New password again" name="confirm" type="password" autoComplete="new-password" error={errors.confirm} />
      <StatusMessage state={state} />
      <Button type="submit" disabled={pending}>
        {pending ? "Saving…" : "Change password"}
      </Button>
    </form>
  );
}
