import { AppError } from "@/lib/api/errors";
import { can, type Permission, type Role } from "./roles";

/** The person (or, later, the LIS connection) behind a request, as read fresh from the database. */
export interface Caller {
  kind: "user";
  id: string;
  email: string;
  name: string;
  role: Role;
  active: boolean;
}

/**
 * The single authorisation rule: a signed-in, active caller whose role holds the permission
 * (with no permission named, any signed-in, active caller: e.g. managing one's own account).
 * Throws AppError (unauthenticated / forbidden) otherwise. Pure, so it is tested for every role.
 */
export function authorize(caller: Caller | null, permission?: Permission): Caller {
  if (!caller) throw new AppError("unauthenticated", "Sign in to continue.");
  if (!caller.active) {
    throw new AppError("unauthenticated", "This account has been deactivated. Ask your administrator.");
  }
  if (permission && !can(caller.role, permission)) {
    throw new AppError("forbidden", `Your role (${caller.role}) may not do this.`);
  }
  return caller;
}
