/**
 * One sign-in attempt over next-auth's HTTP endpoints, as a client at a chosen address: the app
 * under `npm test` trusts 127.0.0.1 as a proxy, so `X-Forwarded-For` names the simulated client.
 * Returns the session cookie on success, or the message the sign-in form would show.
 */
import { BASE_URL } from "./http-session";

export type AttemptResult = { ok: true; cookie: string } | { ok: false; status: number; message: string };

function cookiesOf(res: Response): string[] {
  return res.headers.getSetCookie().map((c) => c.split(";")[0]);
}

export async function attemptSignIn(
  email: string,
  password: string,
  { from, headers = {} }: { from: string; headers?: Record<string, string> },
): Promise<AttemptResult> {
  const csrfRes = await fetch(`${BASE_URL}/api/auth/csrf`);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const jar = cookiesOf(csrfRes);
  const res = await fetch(`${BASE_URL}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: jar.join("; "), "x-forwarded-for": from, ...headers },
    body: new URLSearchParams({ csrfToken, email, password, json: "true" }),
  });
  const session = cookiesOf(res).find((c) => c.startsWith("next-auth.session-token="));
  if (session) return { ok: true, cookie: [...jar, session].join("; ") };
  const { url } = (await res.json()) as { url: string };
  return { ok: false, status: res.status, message: new URL(url).searchParams.get("error") ?? "" };
}

const octet = () => Math.floor(Math.random() * 254) + 1;

/**
 * A client address no other test uses: random in the private range 10.0.0.0/8 (never routed,
 * and 16 million of them, so test files do not meet by chance).
 */
export function freshAddress(): string {
  return `10.${octet()}.${octet()}.${octet()}`;
}

/** A fresh IPv6 client in the documentation range 2001:db8::/32 (RFC 3849), in its own /64. */
export function freshIpv6Network(): string {
  const group = () => (Math.floor(Math.random() * 0xfffe) + 1).toString(16);
  return `2001:db8:${group()}:${group()}`;
}
