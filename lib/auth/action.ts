import "server-only";
import { z } from "zod";
import { unstorableText } from "@/lib/api/body";
import { AppError } from "@/lib/api/errors";
import { zodIssues } from "@/lib/api/problem";
import { StatsInputError } from "@/lib/stats/validate";
import { authorize, type AuthorizeOptions, type Caller } from "./authorize";
import type { Permission } from "./roles";
import { currentSession } from "./session";

import type { ActionState } from "./action-state";

export type { ActionState };

/** What the work of an action reports: a message, or a message and a session ticket. */
export type ActionOutcome = string | { message: string; sessionTicket: string };

/** About the request beyond the caller: this session's id (session tickets are bound to it). */
export interface ActionContext {
  sessionId: string | null;
}

/**
 * Every server action is a public endpoint: this checks the caller's permission on the server,
 * parses the form with zod, runs the work and turns failures into a readable status. While an
 * administrator's password awaits replacement only actions that pass
 * `{ whilePasswordChangeRequired: true }` run (changing one's own password).
 */
export async function runAction<S extends z.ZodType>(
  permission: Permission | null,
  schema: S,
  formData: FormData,
  work: (caller: Caller, input: z.output<S>, context: ActionContext) => Promise<ActionOutcome>,
  options: AuthorizeOptions = {},
): Promise<ActionState> {
  try {
    const session = await currentSession();
    const caller = authorize(session?.caller ?? null, permission ?? undefined, options);
    // A NUL or an unpaired surrogate cannot be stored as text: said at the field, before any work.
    for (const [name, value] of formData) {
      const problem = typeof value === "string" ? unstorableText(value) : null;
      if (problem) return { status: "error", message: "Please correct the marked fields.", fieldErrors: { [name]: problem } };
    }
    const parsed = schema.safeParse(Object.fromEntries(formData));
    if (!parsed.success) {
      const issues = zodIssues(parsed.error);
      return {
        status: "error",
        message: "Please correct the marked fields.",
        fieldErrors: Object.fromEntries(issues.map((i) => [i.path, i.message])),
      };
    }
    const outcome = await work(caller, parsed.data, { sessionId: session?.sessionId ?? null });
    return typeof outcome === "string" ? { status: "ok", message: outcome } : { status: "ok", ...outcome };
  } catch (err) {
    if (err instanceof AppError && Array.isArray(err.details?.errors)) {
      // A rule the database layer checks (a duplicate code, limits in the wrong order) names its
      // fields, so the form can mark them as it marks the schema's.
      const errors = err.details.errors as { path: string; message: string }[];
      return { status: "error", message: err.message, fieldErrors: Object.fromEntries(errors.map((e) => [e.path, e.message])) };
    }
    if (err instanceof AppError || err instanceof StatsInputError) return { status: "error", message: err.message };
    console.error("Server action failed", err);
    return { status: "error", message: "Something went wrong on our side; nothing was changed." };
  }
}
