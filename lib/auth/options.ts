import "server-only";
import { randomUUID } from "node:crypto";
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { z } from "zod";
import { db } from "@/db/client";
import { recordAuditEvent } from "@/db/queries/audit";
import { admitSignInAttempt, settleFailedSignIn, settleSuccessfulSignIn, type SignInAttempt } from "@/db/queries/sign-in-throttle";
import { findUserByEmail, normaliseEmail, recordSignIn } from "@/db/queries/users";
import { clientAddressOf, throttleBucketOf } from "@/lib/api/client-address";
import { env } from "@/lib/env";
import { safeRedirectUrl } from "./callback-url";
import { servedOverHttps, sessionCookies } from "./cookies";
import { verifyAgainstDecoy, verifyPassword } from "./password";
import { verifySessionTicket } from "./session-ticket";
import { THROTTLE_MESSAGES, type ThrottlePolicy } from "./sign-in-throttle";

const credentialsSchema = z.object({
  email: z.string().trim().min(1).max(320),
  password: z.string().min(1).max(1024),
});

/** Thrown messages reach the sign-in form as they are (next-auth passes them as `error`). */
export const SIGN_IN_MESSAGES = {
  invalid: "The e-mail or password is not right.",
  deactivated: "This account has been deactivated. Ask your administrator.",
};

function throttlePolicy(): ThrottlePolicy {
  const e = env();
  return {
    freeFailures: e.BELLWETHER_SIGN_IN_FREE_FAILURES,
    firstDelaySeconds: e.BELLWETHER_SIGN_IN_FIRST_DELAY_SECONDS,
    maxDelaySeconds: e.BELLWETHER_SIGN_IN_MAX_DELAY_MINUTES * 60,
    addressMaxFailures: e.BELLWETHER_SIGN_IN_ADDRESS_MAX_FAILURES,
    windowSeconds: e.BELLWETHER_SIGN_IN_WINDOW_MINUTES * 60,
  };
}

async function authorizeCredentials(raw: unknown, headers: Record<string, string | string[] | undefined>) {
  const parsed = credentialsSchema.safeParse(raw);
  if (!parsed.success) throw new Error(SIGN_IN_MESSAGES.invalid);
  const address = clientAddressOf(headers);
  const attempt: SignInAttempt = { email: normaliseEmail(parsed.data.email), address, bucket: throttleBucketOf(address) };
  const policy = throttlePolicy();
  const database = db();

  const admission = await admitSignInAttempt(database, { attempt, policy });
  if (!admission.admitted) throw new Error(THROTTLE_MESSAGES[admission.scope](admission.waitSeconds));

  const user = await findUserByEmail(database, { email: attempt.email });
  const ok = user ? await verifyPassword(parsed.data.password, user.passwordHash) : await verifyAgainstDecoy(parsed.data.password);
  if (!user || !ok) {
    await settleFailedSignIn(database, { attempt, admission, userId: user?.id ?? null });
    if (admission.address.waitSeconds > 0) throw new Error(THROTTLE_MESSAGES.address(admission.address.waitSeconds));
    if (admission.account.waitSeconds > 0) throw new Error(THROTTLE_MESSAGES.account(admission.account.waitSeconds));
    throw new Error(SIGN_IN_MESSAGES.invalid);
  }
  await database.transaction(async (tx) => {
    await settleSuccessfulSignIn(tx, { attempt, policy });
    if (!user.active) return;
    await recordSignIn(tx, { id: user.id });
    await recordAuditEvent(tx, {
      actor: { id: user.id, label: user.email },
      action: "auth.signed_in",
      entityType: "user",
      entityId: user.id,
      summary: `${user.email} signed in`,
      details: { address: attempt.address },
    });
  });
  if (!user.active) throw new Error(SIGN_IN_MESSAGES.deactivated);
  return { id: user.id, email: user.email, name: user.name, role: user.role, sessionVersion: user.sessionVersion };
}

export function authOptions(): NextAuthOptions {
  const secure = servedOverHttps(env().NEXTAUTH_URL);
  return {
    secret: env().NEXTAUTH_SECRET,
    session: { strategy: "jwt", maxAge: 12 * 60 * 60 },
    useSecureCookies: secure,
    cookies: sessionCookies(secure),
    pages: { signIn: "/sign-in" },
    providers: [
      CredentialsProvider({
        name: "Bellwether",
        credentials: { email: { label: "E-mail", type: "email" }, password: { label: "Password", type: "password" } },
        authorize: (credentials, req) => authorizeCredentials(credentials, req.headers ?? {}),
      }),
    ],
    callbacks: {
      // The token carries the user id, the user's session version at sign-in and an id for this
      // session. Every server check reads the user afresh (lib/auth/session.ts) and refuses a
      // token whose version is no longer the user's, so a password change or reset, a role change
      // or a deactivation ends sessions signed in before.
      jwt({ token, user, trigger, session }) {
        if (user) {
          token.sub = user.id;
          token.role = user.role;
          token.sv = user.sessionVersion;
          token.sid = randomUUID();
        }
        if (trigger === "update") {
          // The only update Bellwether makes: taking up the new version after one's own password
          // change. Without a valid ticket the request fails and next-auth clears the cookie.
          const version = token.sub && token.sid
            ? verifySessionTicket((session as { sessionTicket?: unknown } | undefined)?.sessionTicket, {
                userId: token.sub,
                sessionId: token.sid,
                secret: env().NEXTAUTH_SECRET,
              })
            : null;
          if (version === null) throw new Error("A session is renewed only with a valid ticket.");
          token.sv = version;
        }
        return token;
      },
      session({ session, token }) {
        if (session.user && token.sub) {
          session.user.id = token.sub;
          session.user.role = token.role;
          session.user.sessionVersion = token.sv;
          session.user.sessionId = token.sid;
        }
        return session;
      },
      redirect: safeRedirectUrl,
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
