/**
 * Client access to the study API: SWR's fetcher and the writes, both turning a problem+json
 * answer into an ApiError with the server's message and field errors.
 */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly fieldErrors: { path: string; message: string }[] = [],
  ) {
    super(message);
  }
}

async function toError(res: Response): Promise<ApiError> {
  let detail = `The server answered ${res.status}.`;
  let errors: { path: string; message: string }[] = [];
  try {
    const body = await res.json();
    if (typeof body?.detail === "string") detail = body.detail;
    else if (typeof body?.title === "string") detail = body.title;
    if (Array.isArray(body?.errors)) errors = body.errors;
  } catch {
    // Not JSON: keep the status line.
  }
  return new ApiError(res.status, detail, errors);
}

/** SWR's fetcher: GET a JSON answer. */
export async function fetchJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  if (!res.ok) throw await toError(res);
  return (await res.json()) as T;
}

/** A write: POST, PUT, PATCH or DELETE with an optional JSON body. */
export async function sendJson<T>(method: "POST" | "PUT" | "PATCH" | "DELETE", url: string, body?: unknown): Promise<T> {
  const res = await fetch(url, {
    method,
    headers: body === undefined ? { accept: "application/json" } : { "content-type": "application/json", accept: "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!res.ok) throw await toError(res);
  return (await res.json()) as T;
}

/** What to do next after an error, by its status: the server's message says what went wrong. */
export function nextStep(error: unknown): string {
  if (!(error instanceof ApiError)) return "Check your connection and try again.";
  switch (error.status) {
    case 401:
      return "Your session has ended: sign in again, then repeat the step.";
    case 403:
      return "Only laboratory scientists and directors may do this; ask one of them.";
    case 404:
      return "Reload the page: what you acted on no longer exists.";
    case 409:
      return "Reload the page to see the study as it stands now, then decide again.";
    case 413:
      return "Send fewer items at once.";
    case 422:
      return "Correct what the message names and send again; what you typed is kept.";
    default:
      return error.status >= 500 ? "Try again in a moment; if it persists, tell your administrator." : "Try again.";
  }
}

export function errorMessage(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export const studyApi = (studyId: string) => `/api/v1/studies/${encodeURIComponent(studyId)}`;
