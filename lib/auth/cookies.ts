import type { CookiesOptions } from "next-auth";

/** Whether Bellwether is served over HTTPS, as NEXTAUTH_URL (its public address) says. */
export function servedOverHttps(nextAuthUrl: string | undefined): boolean {
  return nextAuthUrl?.toLowerCase().startsWith("https://") ?? false;
}

/**
 * next-auth's cookies, stated rather than left to its defaults: none readable by scripts
 * (httpOnly), SameSite=Lax, and over HTTPS Secure with the `__Secure-` / `__Host-` names that
 * a browser accepts only from a secure origin. Lax rather than Strict so that a link in a
 * review-due e-mail opens the page signed in; a cross-site change is refused by the origin check
 * (lib/api/origin.ts) and Next's own check of server actions.
 */
export function sessionCookies(secure: boolean): Partial<CookiesOptions> {
  const options = { httpOnly: true, sameSite: "lax" as const, path: "/", secure };
  return {
    sessionToken: { name: sessionCookieName(secure), options },
    callbackUrl: { name: `${secure ? "__Secure-" : ""}next-auth.callback-url`, options },
    csrfToken: { name: `${secure ? "__Host-" : ""}next-auth.csrf-token`, options },
  };
}

/** The session cookie's name, for readers of the token outside next-auth's handler (proxy.ts). */
export function sessionCookieName(secure: boolean): string {
  return `${secure ? "__Secure-" : ""}next-auth.session-token`;
}
