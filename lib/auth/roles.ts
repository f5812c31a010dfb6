import type { Role } from "@/db/schema";

export type { Role };
export { ROLES } from "@/db/schema";

/** Who may do what (DESIGN.md, "Roles"). Checked on the server for every page, handler and action. */
export const PERMISSIONS = {
  "users:manage": ["admin"],
  "audit:read": ["admin", "director"],
  "studies:write": ["director", "scientist"],
  "analytes:write": ["director", "scientist"],
  "donors:read": ["director", "scientist"],
  "versions:sign": ["director"],
  "dossiers:read": ["admin", "director", "scientist"],
  "intervals:read": ["admin", "director", "scientist", "clinician"],
  "scores:create": ["admin", "director", "scientist", "clinician"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role, permission: Permission): boolean {
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

export const ROLE_LABELS: Record<Role, string> = {
  admin: "Administrator",
  director: "Laboratory director",
  scientist: "Laboratory scientist",
  clinician: "Clinician",
};

/** What each permission lets a person do, in the words the overview page shows. */
export const PERMISSION_DESCRIPTIONS: Record<Permission, string> = {
  "users:manage": "Create users, change their roles and deactivate accounts.",
  "audit:read": "Read the audit trail of every change and sign-in.",
  "studies:write": "Create studies, upload healthy-donor results, screen them and draft interval versions.",
  "analytes:write": "Add analytes to the catalogue and edit their units, codes and critical limits.",
  "donors:read": "Read donor-level results of studies.",
  "versions:sign": "Sign off interval versions drafted by others, return them with comments, withdraw them.",
  "dossiers:read": "Print an interval version's sign-off record and download its dossier (donor rows only with access to donor-level data).",
  "intervals:read": "Read the reference intervals in force.",
  "scores:create": "Score a patient value against the interval in force: z-score, percentile and flag, with cautions.",
};
