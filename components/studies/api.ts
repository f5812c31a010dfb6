/** The detail of a problem+json answer, or a sentence saying the answer was unexpected. */
export async function readProblem(res: Response): Promise<string> {
  try {
    const body = await res.json();
    if (typeof body?.detail === "string") return sentence(body.detail);
  } catch {
    // Not JSON: fall through to the status.
  }
  return `The server answered ${res.status} ${res.statusText}.`;
}

/** A message as a sentence: capital first letter, full stop. */
export function sentence(text: string): string {
  const t = text.trim();
  if (t === "") return t;
  const first = t[0].toUpperCase() + t.slice(1);
  return /[.!?]$/.test(first) ? first : `${first}.`;
}

/** SWR's fetcher for the study API: JSON, or an Error carrying the problem's detail. */
export async function fetchJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  if (!res.ok) throw new Error(await readProblem(res));
  return res.json() as Promise<T>;
}
