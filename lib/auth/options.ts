import "server-only";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { z } from "zod";
import { db } from "@/db/client";
import { recordAuditEvent } from "@/db/queries/audit";
import { clearFailures, minutesLocked, recordFailure } from "@/db/queries/sign-in-failures";
import { findUserByEmail, normaliseEmail, recordSignIn } from "@/db/queries/users";
import { env } from "@/lib/env";
import { verifyAgainstDecoy, verifyPassword } from "./password";

const credentialsSchema = z.object({
  email: z.string().trim().min(1).max(320),
  password: z.string().min(1).max(1024),
});

/** Thrown messages reach the sign-in form as they are (next-auth passes them as `error`). */
export const SIGN_IN_MESSAGES = {
  invalid: "The e-mail or password is not right.",
  deactivated: "This account has been deactivated. Ask your administrator.",
  locked: (minutes: number) =>
    `Too many failed sign-ins for this account. Try again in ${minutes} minute${minutes === 1 ? "" : "s"}.`,
};

async function authorizeCredentials(raw: unknown) {
  const parsed = credentialsSchema.safeParse(raw);
  if (!parsed.success) throw new Error(SIGN_IN_MESSAGES.invalid);
  const email = normaliseEmail(parsed.data.email);
  const database = db();
  const locked = await minutesLocked(database, { email });
  if (locked > 0) throw new Error(SIGN_IN_MESSAGES.locked(locked));

  const user = await findUserByEmail(database, { email });
  const ok = user ? await verifyPassword(parsed.data.password, user.passwordHash) : await verifyAgainstDecoy(parsed.data.password);
  if (!user || !ok) {
    const policy = { maxFailures: env().BELLWETHER_SIGN_IN_MAX_FAILURES, lockMinutes: env().BELLWETHER_SIGN_IN_LOCK_MINUTES };
    const nowLocked = await recordFailure(database, { email, policy });
    if (nowLocked > 0) {
      await recordAuditEvent(database, {
        actor: { id: null, label: email },
        action: "auth.locked",
        entityType: "user",
        entityId: user?.id ?? null,
        summary: `Sign-in for ${email} locked for ${nowLocked} minutes after repeated failures`,
      });
      throw new Error(SIGN_IN_MESSAGES.locked(nowLocked));
    }
    throw new Error(SIGN_IN_MESSAGES.invalid);
  }
  if (!user.active) throw new Error(SIGN_IN_MESSAGES.deactivated);
  await clearFailures(database, { email });
  await recordSignIn(database, { id: user.id });
  await recordAuditEvent(database, {
    actor: { id: user.id, label: user.email },
    action: "auth.signed_in",
    entityType: "user",
    entityId: user.id,
    summary: `${user.email} signed in`,
  });
  return { id: user.id, email: user.email, name: user.name, role: user.role };
}

export function authOptions(): NextAuthOptions {
  return {
    secret: env().NEXTAUTH_SECRET,
    session: { strategy: "jwt", maxAge: 12 * 60 * 60 },
    pages: { signIn: "/sign-in" },
    providers: [
      CredentialsProvider({
        name: "Bellwether",
        credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
        authorize: authorizeCredentials,
      }),
    ],
    callbacks: {
      // The token carries only the user id and the role at sign-in; every server check reads
      // the user afresh from the database (lib/auth/session.ts), so a role change or a
      // deactivation takes effect on the next request.
      jwt({ token, user }) {
        if (user) {
          token.sub = user.id;
          token.role = user.role;
        }
        return token;
      },
      session({ session, token }) {
        if (session.user && token.sub) {
          session.user.id = token.sub;
          session.user.role = token.role;
        }
        return session;
      },
    },
    events: {
      async signOut({ token }) {
        if (!token?.sub) return;
        await recordAuditEvent(db(), {
          actor: { id: token.sub, label: token.email ?? token.sub },
          action: "auth.signed_out",
          entityType: "user",
          entityId: token.sub,
          summary: `${token.email ?? "A user"} signed out`,
        });
      },
    },
  };
}
