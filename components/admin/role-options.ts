import { ROLE_LABELS, ROLES } from "@/lib/auth/roles";

export const ROLE_OPTIONS = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }));
