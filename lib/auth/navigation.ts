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
  { href: "/audit", label: "Audit trail", permission: "audit:read" },
  { href: "/account", label: "Account" },
];

export function navigationFor(role: Role): NavItem[] {
  return NAV_ITEMS.filter((item) => !item.permission || can(role, item.permission));
}
