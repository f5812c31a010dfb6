import { DEMO_USERS } from "@/db/seed";
import type { Role } from "@/db/schema";

export function demoUser(role: Role) {
  const user = DEMO_USERS.find((u) => u.role === role);
  if (!user) throw new Error(`no demo user for ${role}`);
  return user;
}
