"use client";

import { startTransition, useActionState, useEffect, useRef, type FormEvent } from "react";
import { IDLE_STATE, type ActionState } from "@/lib/auth/action-state";

/**
 * Runs a server action from a form's submit event rather than its `action` prop, so that React
 * does not clear what the person typed when the server answers with an error. With
 * `resetOnSuccess` the form is cleared once the action succeeds. Returns the action's state, the
 * submit handler and whether it is pending.
 */
export function useFormAction(
  serverAction: (prev: ActionState, formData: FormData) => Promise<ActionState>,
  { resetOnSuccess = false }: { resetOnSuccess?: boolean } = {},
): [ActionState, (event: FormEvent<HTMLFormElement>) => void, boolean] {
  const [state, dispatch, pending] = useActionState(serverAction, IDLE_STATE);
  const form = useRef<HTMLFormElement | null>(null);
  useEffect(() => {
    if (resetOnSuccess && state.status === "ok") form.current?.reset();
  }, [state, resetOnSuccess]);
  const onSubmit = (event: FormEvent<HTMLFormElement>) => {
    event.preventDefault();
    form.current = event.currentTarget;
    const formData = new FormData(event.currentTarget);
    startTransition(() => dispatch(formData));
  };
  return [state, onSubmit, pending];
}
