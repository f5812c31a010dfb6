"use client";

import { startTransition, useActionState, type FormEvent } from "react";
import { IDLE_STATE, type ActionState } from "@/lib/auth/action-state";

/**
 * Runs a server action from a form's submit event rather than its `action` prop, so that React
 * does not clear what the person typed when the server answers with an error. Returns the
 * action's state, the submit handler and whether it is pending.
 */
export function useFormAction(
  serverAction: (prev: ActionState, formData: FormData) => Promise<ActionState>,
): [ActionState, (event: FormEvent<HTMLFormElement>) => void, boolean] {
  const [state, dispatch, pending] = useActionState(serverAction, IDLE_STATE);
  const onSubmit = (event: FormEvent<HTMLFormElement>) => {
    event.preventDefault();
    const formData = new FormData(event.currentTarget);
    startTransition(() => dispatch(formData));
  };
  return [state, onSubmit, pending];
}
