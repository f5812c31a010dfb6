/** What every server action returns; forms show it through useActionState. */
export type ActionState =
  | { status: "idle" }
  | { status: "ok"; message: string }
  | { status: "error"; message: string; fieldErrors?: Record<string, string> };

export const IDLE_STATE: ActionState = { status: "idle" };
