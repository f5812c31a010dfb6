import { ApiError, sendJson } from "@/components/studies/analysis/api";
import type { ScoreItem, ScoreResponse } from "@/lib/scores/schemas";

/** POST /api/v1/scores with the session cookie: the same route the LIS calls. */
export function postScores(items: ScoreItem[]): Promise<ScoreResponse> {
  return sendJson<ScoreResponse>("POST", "/api/v1/scores", { items });
}

/** What to do after a refused request, by its status; the server's message says what went wrong. */
export function scoreNextStep(error: unknown): string {
  if (!(error instanceof ApiError)) return "Check your connection and press Score again; what you entered is kept.";
  switch (error.status) {
    case 401:
      return "Your session has ended: sign in again in another tab, then press Score again.";
    case 403:
      return "Your account may not score values now; the message says why. Ask your administrator if it should.";
    case 413:
      return "Score fewer values at once.";
    case 422:
      return "Correct what the message names and press Score again; what you entered is kept.";
    case 429:
      return "Wait a moment and press Score again.";
    case 503:
      return "The database cannot be reached just now: wait a moment and press Score again.";
    default:
      return error.status >= 500
        ? "Press Score again in a moment; if it keeps failing, tell your administrator."
        : "Press Score again; what you entered is kept.";
  }
}

/** The next step for one value the service could not score, from its error type. */
export function itemNextStep(type: string): string {
  if (/unit/i.test(type)) return "Check the unit: give a UCUM unit such as mmol/L or mg/dL, or leave the analyte's own.";
  if (/sex|partition/i.test(type)) return "Give the patient's sex (and age), so that the right partition can be chosen.";
  if (/age|birth|date/i.test(type)) return "Check the age or the birth and collection dates.";
  if (/interval|in.force|not.found|analyte/i.test(type)) return "Choose another analyte, or ask the laboratory which interval is in force.";
  return "Check the value and the patient's details, then press Score again.";
}
