/**
 * Calls a server action over HTTP as the browser does after hydration: a POST to a page that
 * serves it, with the `Next-Action` header naming the action's id from the production build and
 * the arguments `(previousState, formData)` encoded as React's reply format (the FormData's
 * entries under the prefix "_1_", and field "0" holding the argument list with "$K1" standing for
 * the form). The answer is read from the RSC stream: the action's return value, or the redirect
 * it threw.
 */
import { BASE_URL } from "./http-session";
import { builtServerActions, type BuiltAction } from "./entry-points";

export type ActionAnswer =
  | { kind: "state"; status: number; state: { status: string; message?: string; fieldErrors?: Record<string, string>; sessionTicket?: string } }
  | { kind: "redirect"; status: number; location: string }
  | { kind: "other"; status: number; location: string | null; text: string };

let cache: Map<string, BuiltAction> | null = null;

/** The built action for "file#export" (e.g. "app/(lab)/studies/actions.ts#createStudyAction"). */
export function builtAction(key: string): BuiltAction {
  cache ??= new Map(builtServerActions().map((a) => [a.key, a]));
  const found = cache.get(key);
  if (!found) throw new Error(`the production build has no server action ${key}`);
  return found;
}

/** The rows of an RSC payload: "id:json" lines (ids in hexadecimal). */
function rowsOf(text: string): Map<string, unknown> {
  const rows = new Map<string, unknown>();
  for (const line of text.split("\n")) {
    const m = /^([0-9a-f]+):(.*)$/.exec(line);
    if (!m) continue;
    try {
      rows.set(m[1], JSON.parse(m[2]));
    } catch {
      // Rows that are not JSON (module references, text chunks) carry no action result.
    }
  }
  return rows;
}

export async function callServerAction(
  key: string,
  fields: Record<string, string | Blob>,
  { cookie, headers = {} }: { cookie?: string; headers?: Record<string, string> } = {},
): Promise<ActionAnswer> {
  const action = builtAction(key);
  const body = new FormData();
  for (const [name, value] of Object.entries(fields)) body.append(`_1_${name}`, value);
  body.set("0", JSON.stringify([{ status: "idle" }, "$K1"]));
  const res = await fetch(`${BASE_URL}${action.pagePath}`, {
    method: "POST",
    redirect: "manual",
    headers: {
      accept: "text/x-component",
      "next-action": action.id,
      origin: BASE_URL,
      ...(cookie ? { cookie } : {}),
      ...headers,
    },
    body,
  });
  const actionRedirect = res.headers.get("x-action-redirect");
  const text = await res.text();
  if (actionRedirect) return { kind: "redirect", status: res.status, location: actionRedirect.split(";")[0] };
  if ((res.headers.get("content-type") ?? "").startsWith("text/x-component")) {
    const rows = rowsOf(text);
    const root = rows.get("0") as { a?: unknown } | undefined;
    let result = root?.a;
    if (typeof result === "string" && result.startsWith("$@")) result = rows.get(result.slice(2));
    if (result && typeof result === "object" && "status" in result) {
      return { kind: "state", status: res.status, state: result as Extract<ActionAnswer, { kind: "state" }>["state"] };
    }
  }
  return { kind: "other", status: res.status, location: res.headers.get("location"), text: text.slice(0, 500) };
}
