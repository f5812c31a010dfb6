import "server-only";
import { z } from "zod";
import { AppError } from "@/lib/api/errors";
import { zodIssues } from "@/lib/api/problem";
import { StatsInputError } from "@/lib/stats/validate";
import { authorize, type Caller } from "./authorize";
import type { Permission } from "./roles";
import { currentCaller } from "./session";

import type { ActionState } from "./action-state";

export type { ActionState };

/**
 * Every server action is a public endpoint: this checks the caller's permission on the server,
 * parses the form with zod, runs the work and turns failures into a readable status.
 */
export async function runAction<S extends z.ZodType>(
  permission: Permission | null,
  schema: S,
  formData: FormData,
  work: (caller: Caller, input: z.output<S>) => Promise<string>,
): Promise<ActionState> {
  try {
    const caller = authorize(await currentCaller(), permission ?? undefined);
    const parsed = schema.safeParse(Object.fromEntries(formData));
    if (!parsed.success) {
      const issues = zodIssues(parsed.error);
      return {
        status: "error",
        message: "Please correct the marked fields.",
        fieldErrors: Object.fromEntries(issues.map((i) => [i.path, i.message])),
      };
    }
    return { status: "ok", message: await work(caller, parsed.data) };
  } catch (err) {
    if (err instanceof AppError || err instanceof StatsInputError) return { status: "error", message: err.message };
    console.error("Server action failed", err);
    return { status: "error", message: "Something went wrong on our side; nothing was changed." };
  }
}
