import type { Role } from "@/db/schema";
import "next-auth";
import "next-auth/jwt";

declare module "next-auth" {
  interface User {
    id: string;
    role: Role;
    sessionVersion: number;
  }
  interface Session {
    user: { id: string; role: Role; sessionVersion: number; sessionId: string; name?: string | null; email?: string | null };
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    role: Role;
    /** The user's session version when this session was signed in (or renewed with a ticket). */
    sv: number;
    /** This session's own id, made at sign-in; session tickets are bound to it. */
    sid: string;
  }
}
