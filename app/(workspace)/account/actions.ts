"use server";

import { z } from "zod";
import { db } from "@/db/client";
import { changePassword, findUserByEmail } from "@/db/queries/users";
import { AppError } from "@/lib/api/errors";
import { runAction, type ActionState } from "@/lib/auth/action";
import { PASSWORD_MIN_LENGTH, verifyPassword } from "@/lib/auth/password";
import { actorOf } from "@/lib/auth/session";

const schema = z
  .object({
    current: z.string().min(1, "Enter your current password."),
    next: z.string().min(PASSWORD_MIN_LENGTH, `At least ${PASSWORD_MIN_LENGTH} characters.`).max(200),
    confirm: z.string(),
  })
  .refine((v) => v.next === v.confirm, { path: ["confirm"], message: "The two new passwords differ." })
  .refine((v) => v.next !== v.current, { path: ["next"], message: "Choose a password different from the current one." });

export async function changeOwnPasswordAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  // Every signed-in, active user may change their own password.
  return runAction(null, schema, formData, async (caller, input) => {
    const user = await findUserByEmail(db(), { email: caller.email });
    if (!user || !(await verifyPassword(input.current, user.passwordHash))) {
      throw new AppError("invalid", "Your current password is not right; nothing was changed.");
    }
    await changePassword(db(), { id: caller.id, password: input.next, actor: actorOf(caller) });
    return "Your password has been changed.";
  });
}
