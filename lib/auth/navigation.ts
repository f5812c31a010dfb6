import { can, type Permission, type Role } from "./roles";

export interface NavItem {
  href: string;
  label: string;
  permission?: Permission;
}

/** The app's sections; each is shown only to the roles that may use it. */
export const NAV_ITEMS: readonly NavItem[] = [
  { href: "/", label: "Overview" },
  { href: "/admin/users", label: "Users", permission: "users:manage" },
  { href: "/admin/lis-connections", label: "LIS connections", permission: "users:manage" },
  { href: "/admin/outbox", label: "Outbox", permission: "users:manage" },
  { href: "/signoff", label: "Sign-off queue", permission: "versions:sign" },
  { href: "/studies", label: "Studies", permission: "studies:write" },
  { href: "/adoption-checks", label: "Adoption checks", permission: "studies:write" },
  // Everyone signed in may read the catalogue (the API serves it to all); the section is for the
  // people who keep it.
  { href: "/analytes", label: "Analytes", permission: "analytes:write" },
  { href: "/intervals", label: "Intervals", permission: "intervals:read" },
  { href: "/score", label: "Score", permission: "scores:create" },
  { href: "/audit", label: "Audit trail", permission: "audit:read" },
  { href: "/account", label: "Account" },
];

/**
 * The sidebar order of each role (UX.md, "Navigation by role"): each role sees its own work first,
 * so one shared order cannot serve all four (a clinician's Score comes before Intervals, an
 * admin's Audit trail before them). A section missing here follows in NAV_ITEMS order; an href
 * listed here that is no section is skipped.
 */
const ROLE_ORDER: Record<Role, readonly string[]> = {
  scientist: ["/", "/studies", "/adoption-checks", "/analytes", "/intervals", "/score", "/account"],
  director: ["/", "/signoff", "/studies", "/adoption-checks", "/analytes", "/intervals", "/score", "/audit", "/account"],
  clinician: ["/", "/score", "/intervals", "/account"],
  admin: ["/", "/admin/users", "/admin/lis-connections", "/admin/outbox", "/audit", "/intervals", "/score", "/account"],
};

export function navigationFor(role: Role): NavItem[] {
  const allowed = NAV_ITEMS.filter((item) => !item.permission || can(role, item.permission));
  const order = ROLE_ORDER[role];
  const rank = (item: NavItem) => {
    const i = order.indexOf(item.href);
    return i === -1 ? order.length + NAV_ITEMS.indexOf(item) : i;
  };
  return [...allowed].sort((a, b) => rank(a) - rank(b));
}
