import type { VersionState } from "./state-machine";

/**
 * Why an analyte cannot be scored, in words, from the states of its interval versions (newest
 * first); null when a version is in force. Said on the score page's search and under the register.
 */
export function noIntervalReason(states: readonly VersionState[], withdrawnOn: string | null): string | null {
  if (states.includes("in_force")) return null;
  if (states.length === 0) return "No interval yet: the laboratory has not established or adopted one for this analyte.";
  if (states.includes("awaiting_signoff")) return "No interval in force yet: a version is awaiting the director's sign-off.";
  if (states.includes("withdrawn")) {
    return `No interval in force: the last one was withdrawn${withdrawnOn ? ` on ${withdrawnOn}` : ""}.`;
  }
  if (states.includes("draft")) return "No interval in force yet: a version is in draft at the laboratory.";
  return "No interval in force.";
}

/** Who an interval's partition applies to, in words for the people who score: "F, age 18 and over", "Everyone". */
export function patientScopeLabel(label: string): string {
  return label === "All donors" ? "Everyone" : label;
}
