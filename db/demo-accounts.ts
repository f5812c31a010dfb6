/**
 * The demo's invented laboratory and its accounts, whose passwords the README publishes. Data
 * only, so that the seed, the serving checks and the password rules can all read it.
 */
import type { Role } from "./schema";

export const DEMO_LABORATORY = "Harrowmere Regional Hospital · Clinical Chemistry";

export const DEMO_USERS: readonly { name: string; email: string; role: Role; password: string }[] = [
  { name: "Ines Okonkwo-Hale", email: "admin@harrowmere.example", role: "admin", password: "bellwether-admin-demo" },
  { name: "Dr Tomas Verhaegen", email: "director@harrowmere.example", role: "director", password: "bellwether-director-demo" },
  { name: "Priya Lindqvist", email: "scientist@harrowmere.example", role: "scientist", password: "bellwether-scientist-demo" },
  { name: "Dr Aurelio Banks", email: "clinician@harrowmere.example", role: "clinician", password: "bellwether-clinician-demo" },
];

/** Whether a password is one of those the README publishes for the demo accounts. */
export function isPublishedDemoPassword(password: string): boolean {
  return DEMO_USERS.some((u) => u.password === password);
}
