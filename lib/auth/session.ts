import "server-only";
import { getServerSession } from "next-auth";
import { forbidden, redirect } from "next/navigation";
import { db } from "@/db/client";
import type { Actor } from "@/db/queries/audit";
import { findUserById } from "@/db/queries/users";
import { AppError } from "@/lib/api/errors";
import { authOptions } from "./options";
import { authorize, type Caller } from "./authorize";
import type { Permission } from "./roles";

/** The signed-in user, read afresh from the database (role and active flag as they are now). */
export async function currentCaller(): Promise<Caller | null> {
  const session = await getServerSession(authOptions());
  const id = session?.user?.id;
  if (!id) return null;
  const user = await findUserById(db(), { id });
  if (!user) return null;
  return { kind: "user", id: user.id, email: user.email, name: user.name, role: user.role, active: user.active };
}

/**
 * For pages: sends anonymous or deactivated users to sign-in and answers 403 (app/forbidden.tsx)
 * when the role lacks the permission.
 */
export async function requirePageCaller(permission?: Permission): Promise<Caller> {
  const caller = await currentCaller();
  if (!caller || !caller.active) redirect("/sign-in");
  try {
    return authorize(caller, permission);
  } catch (err) {
    if (err instanceof AppError && err.code === "forbidden") forbidden();
    throw err;
  }
}

export function actorOf(caller: Caller): Actor {
  return { id: caller.id, label: caller.email };
}
