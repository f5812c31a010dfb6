import { apiRoute } from "@/lib/api/handler";
import { can, PERMISSIONS, type Permission } from "@/lib/auth/roles";

export const dynamic = "force-dynamic";

/** Who the caller is and what it may do. */
export const GET = apiRoute({ permission: "intervals:read" }, async ({ caller }) => ({
  id: caller.id,
  email: caller.email,
  name: caller.name,
  role: caller.role,
  permissions: (Object.keys(PERMISSIONS) as Permission[]).filter((p) => can(caller.role, p)),
}));
