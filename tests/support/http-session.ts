/**
 * Signs in through next-auth's own HTTP endpoints (CSRF token, then the credentials callback)
 * and returns the cookie header a browser would send, for integration tests of route handlers.
 */
export const BASE_URL = process.env.BELLWETHER_BASE_URL ?? "http://127.0.0.1:3100";

function cookiesOf(res: Response): string[] {
  return res.headers.getSetCookie().map((c) => c.split(";")[0]);
}

export async function signInOverHttp(email: string, password: string): Promise<string> {
  const csrfRes = await fetch(`${BASE_URL}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const jar = cookiesOf(csrfRes);
  const res = await fetch(`${BASE_URL}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: jar.join("; ") },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }),
  });
  const session = cookiesOf(res).find((c) => c.startsWith("next-auth.session-token="));
  if (!session) throw new Error(`sign-in failed for ${email} (status ${res.status})`);
  return [...jar, session].join("; ");
}
