/** What every server action returns; forms show it through useActionState. */
export type ActionState =
  | { status: "idle" }
  | { status: "ok"; message: string; sessionTicket?: string }
  | { status: "error"; message: string; fieldErrors?: Record<string, string> };

export const IDLE_STATE: ActionState = { status: "idle" };

/** A server action as a form receives it: pages pass actions to components as props of this type. */
export type FormServerAction = (prev: ActionState, formData: FormData) => Promise<ActionState>;
