"use client";

import type { Session } from "next-auth";
import { SessionProvider, useSession } from "next-auth/react";
import { useRouter } from "next/navigation";
import { useCallback } from "react";
import { Button } from "@/components/ui/button";
import { TextField } from "@/components/ui/field";
import { StatusMessage } from "@/components/ui/status-message";
import { useFormAction } from "@/components/ui/use-form-action";
import type { ActionState, FormServerAction } from "@/lib/auth/action-state";

/**
 * Changing one's own password ends every session signed in before, this one included, unless
 * it takes up the ticket the action returns through next-auth's session update.
 *
 * The page hands in the session it was rendered with: next-auth's update does nothing while the
 * provider is still fetching the session, and a fetch that lands after the change would find this
 * session already ended, so the provider must not start by fetching.
 */
export function ChangePasswordForm({
  session,
  ...props
}: {
  session: Session;
  action: FormServerAction;
  /** Where to go once the password is changed: stay on the page, or go to the overview. */
  afterChange?: "stay" | "overview";
  currentLabel?: string;
}) {
  return (
    <SessionProvider session={session} refetchOnWindowFocus={false}>
      <PasswordFields {...props} />
    </SessionProvider>
  );
}

function PasswordFields({
  action,
  afterChange = "stay",
  currentLabel = "Current password",
}: {
  action: FormServerAction;
  afterChange?: "stay" | "overview";
  currentLabel?: string;
}) {
  const { update } = useSession();
  const router = useRouter();
  const changeAndKeepSession = useCallback(
    async (prev: ActionState, formData: FormData): Promise<ActionState> => {
      const result = await action(prev, formData);
      if (result.status !== "ok" || !result.sessionTicket) return result;
      const renewed = await update({ sessionTicket: result.sessionTicket });
      if (!renewed) {
        return {
          status: "error",
          message: "Your password has been changed, but this session could not be kept. Sign in again with the new password.",
        };
      }
      if (afterChange === "overview") router.replace("/");
      return { status: "ok", message: result.message };
    },
    [action, update, afterChange, router],
  );
  const [state, onSubmit, pending] = useFormAction(changeAndKeepSession, { resetOnSuccess: true });
  const errors = state.status === "error" ? state.fieldErrors ?? {} : {};
  return (
    <form onSubmit={onSubmit} className="max-w-md space-y-3">
      <TextField label={currentLabel} name="current" type="password" autoComplete="current-password" error={errors.current} />
      <TextField label="New password" name="next" type="password" autoComplete="new-password" error={errors.next} hint="At least 12 characters." />
      <TextField label="New password again" name="confirm" type="password" autoComplete="new-password" error={errors.confirm} />
      <StatusMessage state={state} />
      <Button type="submit" disabled={pending}>
        {pending ? "Saving…" : "Change password"}
      </Button>
    </form>
  );
}
