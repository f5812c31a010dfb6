import { readProblem } from "@/components/studies/api";

/** A problem's field messages without their paths ("The rate limit is …"), else its detail. */
async function problemMessage(res: Response): Promise<string> {
  const copy = res.clone();
  try {
    const body = (await res.json()) as { errors?: { message?: unknown }[] };
    const messages = (body.errors ?? []).map((e) => e.message).filter((m): m is string => typeof m === "string");
    if (messages.length > 0) return messages.join(" ");
  } catch {
    // Not JSON: the generic reader says what came back.
  }
  return readProblem(copy);
}

export const CONNECTIONS_URL = "/api/v1/lis-connections";
export const USAGE_URL = "/api/v1/lis-connections/usage";

/** Sends JSON to the admin API; resolves to the answer, or throws an Error with the problem's detail. */
export async function sendJson<T>(method: "POST" | "PATCH", url: string, body?: unknown): Promise<T> {
  const res = await fetch(url, {
    method,
    headers: body === undefined ? { accept: "application/json" } : { accept: "application/json", "content-type": "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!res.ok) throw new Error(await problemMessage(res));
  return res.json() as Promise<T>;
}

/** An instant as 2026-03-02 14:05 UTC: the same for every administrator reading it. */
export function utcMinute(iso: string | null): string {
  return iso ? `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC` : "—";
}
