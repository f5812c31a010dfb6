/**
 * Signs in through next-auth's own HTTP endpoints (CSRF token, then the credentials callback)
 * and returns the cookie header a browser would send, for integration tests of route handlers.
 */
export const BASE_URL = process.env.BELLWETHER_BASE_URL ?? "http://127.0.0.1:3100";

export type AttemptResult = { ok: true; cookie: string } | { ok: false; status: number; message: string };

function cookiesOf(res: Response): string[] {
  return res.headers.getSetCookie().map((c) => c.split(";")[0]);
}

/**
 * One sign-in attempt; with `from`, as a client at that address (the app under `npm test` trusts
 * 127.0.0.1 as a proxy, so `X-Forwarded-For` names the simulated client). Returns the session
 * cookie on success, or the message the sign-in form would show.
 */
export async function attemptSignIn(
  email: string,
  password: string,
  { from, headers = {} }: { from?: string; headers?: Record<string, string> } = {},
): Promise<AttemptResult> {
  const csrfRes = await fetch(`${BASE_URL}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const jar = cookiesOf(csrfRes);
  const res = await fetch(`${BASE_URL}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: {
      "content-type": "application/x-www-form-urlencoded",
      cookie: jar.join("; "),
      ...(from ? { "x-forwarded-for": from } : {}),
      ...headers,
    },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }),
  });
  const session = cookiesOf(res).find((c) => c.startsWith("next-auth.session-token="));
  if (session) return { ok: true, cookie: [...jar, session].join("; ") };
  const { url } = (await res.json()) as { url: string };
  return { ok: false, status: res.status, message: new URL(url).searchParams.get("error") ?? "" };
}

export async function signInOverHttp(email: string, password: string): Promise<string> {
  const result = await attemptSignIn(email, password);
  if (!result.ok) throw new Error(`sign-in failed for ${email} (status ${result.status}: ${result.message})`);
  return result.cookie;
}
