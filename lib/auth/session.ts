import "server-only";
import { getServerSession, type Session } from "next-auth";
import { forbidden, redirect } from "next/navigation";
import { db } from "@/db/client";
import type { Actor } from "@/db/queries/audit";
import { findUserById } from "@/db/queries/users";
import { AppError } from "@/lib/api/errors";
import { authOptions } from "./options";
import { authorize, type Caller } from "./authorize";
import type { Permission } from "./roles";

/** The page where a person replaces a password an administrator set. */
export const CHANGE_PASSWORD_PATH = "/change-password";

/**
 * The signed-in user, read afresh from the database (role, active flag and password state as
 * they are now), with this session's id. A session whose version is no longer the user's (the
 * password, the role or the active flag changed since it was signed in) counts as signed out.
 */
export async function currentSession(): Promise<{ caller: Caller; sessionId: string } | null> {
  const session = await getServerSession(authOptions());
  const claims = session?.user;
  if (!claims?.id) return null;
  const user = await findUserById(db(), { id: claims.id });
  if (!user) return null;
  // A deactivated user is returned as such (every check refuses them, saying why); any other
  // user only while the session's version is still theirs.
  if (user.active && user.sessionVersion !== claims.sessionVersion) return null;
  return {
    caller: {
      kind: "user",
      id: user.id,
      email: user.email,
      name: user.name,
      role: user.role,
      active: user.active,
      mustChangePassword: user.mustChangePassword,
    },
    sessionId: claims.sessionId,
  };
}

/** next-auth's own session object, for a client component that needs its SessionProvider primed. */
export async function nextAuthSession(): Promise<Session | null> {
  return getServerSession(authOptions());
}

export async function currentCaller(): Promise<Caller | null> {
  return (await currentSession())?.caller ?? null;
}

/**
 * For pages: sends anonymous or deactivated users to sign-in, people who must replace an
 * administrator's password to the change-password page, and answers 403 (app/forbidden.tsx)
 * when the role lacks the permission.
 */
export async function requirePageCaller(permission?: Permission): Promise<Caller> {
  const caller = await currentCaller();
  if (!caller || !caller.active) redirect("/sign-in");
  if (caller.mustChangePassword) redirect(CHANGE_PASSWORD_PATH);
  try {
    return authorize(caller, permission);
  } catch (err) {
    if (err instanceof AppError && err.code === "forbidden") forbidden();
    throw err;
  }
}

/** For the change-password page: only people who must replace an administrator's password. */
export async function requirePasswordChangeCaller(): Promise<Caller> {
  const caller = await currentCaller();
  if (!caller || !caller.active) redirect("/sign-in");
  if (!caller.mustChangePassword) redirect("/account");
  return caller;
}

export function actorOf(caller: Caller): Actor {
  return { id: caller.id, label: caller.email };
}
