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
  /** An administrator set the password: until the person replaces it, they may do nothing else. */
  mustChangePassword: boolean;
}

export const PASSWORD_CHANGE_REQUIRED_MESSAGE =
  "An administrator set your password: choose your own before doing anything else. Sign in to Bellwether in a browser to change it.";

export interface AuthorizeOptions {
  /** Changing one's own password is the one thing allowed while a password change is required. */
  whilePasswordChangeRequired?: boolean;
}

/**
 * The single authorisation rule: a signed-in, active caller who has chosen their own password
 * and whose role holds the permission (with no permission named, any such caller: e.g.
 * managing one's own account). Throws AppError (unauthenticated / forbidden) otherwise. Pure,
 * so it is tested for every role.
 */
export function authorize(caller: Caller | null, permission?: Permission, options: AuthorizeOptions = {}): Caller {
  if (!caller) throw new AppError("unauthenticated", "Sign in to continue.");
  if (!caller.active) {
    throw new AppError("unauthenticated", "This account has been deactivated. Ask your administrator.");
  }
  if (caller.mustChangePassword && !options.whilePasswordChangeRequired) {
    throw new AppError("forbidden", PASSWORD_CHANGE_REQUIRED_MESSAGE);
  }
  if (permission && !can(caller.role, permission)) {
    throw new AppError("forbidden", `Your role (${caller.role}) may not do this.`);
  }
  return caller;
}
