"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { changePassword, changeUserRole, createUser, setUserActive } from "@/db/queries/users";
import { AppError } from "@/lib/api/errors";
import { runAction, type ActionState } from "@/lib/auth/action";
import { PASSWORD_MIN_LENGTH } from "@/lib/auth/password";
import { ROLES } from "@/lib/auth/roles";
import { actorOf } from "@/lib/auth/session";

const password = z
  .string()
  .min(PASSWORD_MIN_LENGTH, `At least ${PASSWORD_MIN_LENGTH} characters.`)
  .max(200, "At most 200 characters.");

const createSchema = z.object({
  name: z.string().trim().min(2, "Enter the person's full name.").max(120),
  email: z.email("Enter a valid e-mail address.").max(320),
  role: z.enum(ROLES, "Choose a role."),
  password,
});

export async function createUserAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction("users:manage", createSchema, formData, async (caller, input) => {
    // The administrator chose this password, so the person replaces it at the first sign-in.
    const user = await createUser(db(), { input: { ...input, mustChangePassword: true }, actor: actorOf(caller) });
    revalidatePath("/admin/users");
    return `Created ${user.name} (${user.email}) as ${user.role}. They choose their own password at the first sign-in.`;
  });
}

const roleSchema = z.object({ id: z.uuid(), role: z.enum(ROLES, "Choose a role.") });

export async function changeRoleAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction("users:manage", roleSchema, formData, async (caller, { id, role }) => {
    await changeUserRole(db(), { id, role, actor: actorOf(caller) });
    revalidatePath("/admin/users");
    return `Role changed to ${role}; their open sessions have ended.`;
  });
}

const activeSchema = z.object({ id: z.uuid(), active: z.enum(["true", "false"]).transform((v) => v === "true") });

export async function setActiveAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction("users:manage", activeSchema, formData, async (caller, { id, active }) => {
    await setUserActive(db(), { id, active, actor: actorOf(caller) });
    revalidatePath("/admin/users");
    return active ? "Account reactivated." : "Account deactivated; the person's sessions have ended.";
  });
}

const passwordSchema = z.object({ id: z.uuid(), password });

export async function setPasswordAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  return runAction("users:manage", passwordSchema, formData, async (caller, { id, password: pw }) => {
    if (id === caller.id) throw new AppError("conflict", "Change your own password under Account.");
    await changePassword(db(), { id, password: pw, actor: actorOf(caller) });
    revalidatePath("/admin/users");
    return "New password set and the person's sessions ended. Give it to them through a safe channel; they must change it at the next sign-in.";
  });
}
