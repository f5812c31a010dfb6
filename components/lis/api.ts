import { readProblem } from "@/components/studies/api";

export const CONNECTIONS_URL = "/api/v1/lis-connections";
export const USAGE_URL = "/api/v1/lis-connections/usage";

/** Sends JSON to the admin API; resolves to the answer, or throws an Error with the problem's detail. */
export async function sendJson<T>(method: "POST" | "PATCH", url: string, body?: unknown): Promise<T> {
  const res = await fetch(url, {
    method,
    headers: body === undefined ? { accept: "application/json" } : { accept: "application/json", "content-type": "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!res.ok) throw new Error(await readProblem(res));
  return res.json() as Promise<T>;
}

/** An instant as 2026-03-02 14:05 UTC: the same for every administrator reading it. */
export function utcMinute(iso: string | null): string {
  return iso ? `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC` : "—";
}
