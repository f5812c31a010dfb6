/**
 * Calls a server action of the served build over HTTP as the browser's form would: the action's
 * id from the build's server-reference manifest, the arguments `(previousState, formData)`
 * encoded by React's own `encodeReply`, posted to a page that uses the action with `Next-Action`.
 */
import fs from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { BASE_URL } from "./http-session";

const ROOT = path.resolve(__dirname, "..", "..");
const requireHere = createRequire(path.join(ROOT, "package.json"));
const { encodeReply } = requireHere("next/dist/compiled/react-server-dom-webpack/client.edge") as {
  encodeReply: (value: unknown) => Promise<string | FormData>;
};

interface ManifestEntry {
  filename: string;
  exportedName: string;
  workers: Record<string, unknown>;
}

/** The id of `exportedName` of `file` (e.g. "app/(lab)/analytes/actions.ts") in the current build. */
export function serverActionId(file: string, exportedName: string): string {
  const manifest = JSON.parse(fs.readFileSync(path.join(ROOT, ".next", "server", "server-reference-manifest.json"), "utf8")) as {
    node: Record<string, ManifestEntry>;
  };
  const found = Object.entries(manifest.node).find(([, e]) => e.filename === file && e.exportedName === exportedName);
  if (!found) throw new Error(`the build has no server action ${exportedName} in ${file}`);
  return found[0];
}

export interface ActionCall {
  file: string;
  name: string;
  /** The page the form is on, e.g. "/analytes". */
  page: string;
  fields: Record<string, string>;
  cookie?: string;
  headers?: Record<string, string>;
}

/** Posts the action call; the caller decides which Origin and Sec-Fetch-Site headers go with it. */
export async function postServerAction(call: ActionCall, send: typeof fetch = fetch): Promise<Response> {
  const form = new FormData();
  for (const [key, value] of Object.entries(call.fields)) form.set(key, value);
  const body = await encodeReply([{ status: "idle" }, form]);
  const headers: Record<string, string> = { "next-action": serverActionId(call.file, call.name), accept: "text/x-component", ...call.headers };
  if (call.cookie) headers.cookie = call.cookie;
  if (typeof body === "string") headers["content-type"] = "text/plain;charset=UTF-8";
  return send(`${BASE_URL}${call.page}`, { method: "POST", headers, body });
}

/** The action's returned state, read from the RSC answer (a line `N:{…"status":…}`), or null. */
export function actionStateOf(text: string): { status: string; message?: string; [k: string]: unknown } | null {
  for (const line of text.split("\n")) {
    const match = /^[0-9a-f]+:(\{.*\})$/.exec(line);
    if (!match) continue;
    try {
      const value = JSON.parse(match[1]) as Record<string, unknown>;
      if (typeof value.status === "string") return value as { status: string; message?: string };
      if (value.a && typeof (value.a as Record<string, unknown>).status === "string") return value.a as { status: string; message?: string };
    } catch {
      // another chunk of the answer
    }
  }
  return null;
}
