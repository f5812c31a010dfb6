"use server";

import { z } from "zod";
import { db } from "@/db/client";
import { changePassword, findUserByEmail } from "@/db/queries/users";
import { AppError } from "@/lib/api/errors";
import { runAction, type ActionState } from "@/lib/auth/action";
import { PASSWORD_MIN_LENGTH, verifyPassword } from "@/lib/auth/password";
import { actorOf } from "@/lib/auth/session";
import { issueSessionTicket } from "@/lib/auth/session-ticket";
import { env } from "@/lib/env";

const schema = z
  .object({
    current: z.string().min(1, "Enter your current password."),
    next: z.string().min(PASSWORD_MIN_LENGTH, `At least ${PASSWORD_MIN_LENGTH} characters.`).max(200),
    confirm: z.string(),
  })
  .refine((v) => v.next === v.confirm, { path: ["confirm"], message: "The two new passwords differ." })
  .refine((v) => v.next !== v.current, { path: ["next"], message: "Choose a password different from the current one." });

/**
 * Every signed-in, active user may change their own password, also (and only this) while an
 * administrator's password awaits replacement. Every other session of the user ends; this one
 * receives a ticket to take up the new session version (lib/auth/session-ticket.ts).
 */
export async function changeOwnPasswordAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction(
    null,
    schema,
    formData,
    async (caller, input, { sessionId }) => {
      const user = await findUserByEmail(db(), { email: caller.email });
      if (!user || !(await verifyPassword(input.current, user.passwordHash))) {
        throw new AppError("invalid", "Your current password is not right; nothing was changed.");
      }
      const { sessionVersion } = await changePassword(db(), { id: caller.id, password: input.next, actor: actorOf(caller) });
      if (!sessionId) return "Your password has been changed. Sign in again with the new password.";
      const sessionTicket = issueSessionTicket({ userId: caller.id, sessionId, version: sessionVersion }, { secret: env().NEXTAUTH_SECRET });
      return { message: "Your password has been changed. Any other session of yours has been signed out.", sessionTicket };
    },
    { whilePasswordChangeRequired: true },
  );
}
