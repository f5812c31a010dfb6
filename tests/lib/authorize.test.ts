import { describe, expect, it } from "vitest";
import { AppError } from "@/lib/api/errors";
import { authorize, type Caller } from "@/lib/auth/authorize";
import { navigationFor } from "@/lib/auth/navigation";
import { PERMISSIONS, ROLES, type Permission, type Role } from "@/lib/auth/roles";

const caller = (role: Role, active = true, mustChangePassword = false): Caller => ({
  kind: "user",
  id: "00000000-0000-4000-8000-000000000001",
  email: `${role}@example.test`,
  name: role,
  role,
  active,
  mustChangePassword,
});

function codeOf(fn: () => unknown): string | null {
  try {
    fn();
    return null;
  } catch (err) {
    return err instanceof AppError ? err.code : "unexpected";
  }
}

// The expected table is DESIGN.md's "Roles" table, written out by hand so that a change to
// PERMISSIONS that departs from the design shows up here.
const DESIGN_TABLE: Record<Permission, Role[]> = {
  "users:manage": ["admin"],
  "audit:read": ["admin", "director"],
  "studies:write": ["director", "scientist"],
  // The catalogue is kept by the people who create studies ("create studies, … draft").
  "analytes:write": ["director", "scientist"],
  "donors:read": ["director", "scientist"],
  "versions:sign": ["director"],
  // The issue on sign-off: "Donor rows go only to roles that may read donor data; an admin's
  // dossier has everything else." Clinicians and LIS keys get none.
  "dossiers:read": ["admin", "director", "scientist"],
  "intervals:read": ["admin", "director", "scientist", "clinician"],
  "scores:create": ["admin", "director", "scientist", "clinician"],
};

describe("authorize", () => {
  for (const permission of Object.keys(PERMISSIONS) as Permission[]) {
    for (const role of ROLES) {
      const allowed = DESIGN_TABLE[permission].includes(role);
      it(`${role} ${allowed ? "may" : "may not"} ${permission}`, () => {
        expect(codeOf(() => authorize(caller(role), permission))).toBe(allowed ? null : "forbidden");
      });
    }
  }

  it("refuses an anonymous caller with 401 and a sign-in message", () => {
    try {
      authorize(null, "intervals:read");
      expect.unreachable();
    } catch (err) {
      expect(err).toBeInstanceOf(AppError);
      expect((err as AppError).status).toBe(401);
      expect((err as AppError).message).toBe("Sign in to continue.");
    }
  });

  it("refuses a deactivated user whatever the role, even an administrator", () => {
    for (const role of ROLES) {
      expect(codeOf(() => authorize(caller(role, false), "intervals:read"))).toBe("unauthenticated");
    }
    expect(() => authorize(caller("admin", false), "users:manage")).toThrow("This account has been deactivated");
  });

  it("returns the caller when allowed", () => {
    const c = caller("director");
    expect(authorize(c, "versions:sign")).toBe(c);
  });
});

describe("navigation", () => {
  it("shows each role only the sections it may use, in UX.md's order for the role", () => {
    // UX.md, "Navigation by role (sidebar order)", written out; issue 8 put the director's and the
    // scientist's Adoption checks right after Studies. The admins' LIS connections come between Users and Outbox.
    expect(navigationFor("admin").map((i) => i.href)).toEqual(["/", "/admin/users", "/admin/lis-connections", "/admin/outbox", "/audit", "/intervals", "/score", "/account"]);
    expect(navigationFor("director").map((i) => i.href)).toEqual([
      "/",
      "/signoff",
      "/studies",
      "/adoption-checks",
      "/analytes",
      "/intervals",
      "/score",
      "/audit",
      "/account",
    ]);
    expect(navigationFor("scientist").map((i) => i.href)).toEqual(["/", "/studies", "/adoption-checks", "/analytes", "/intervals", "/score", "/account"]);
    expect(navigationFor("clinician").map((i) => i.href)).toEqual(["/", "/score", "/intervals", "/account"]);
  });
});

describe("authorize without a permission (one's own account)", () => {
  it("lets every active role through and still refuses anonymous and deactivated callers", () => {
    for (const role of ROLES) expect(codeOf(() => authorize(caller(role)))).toBeNull();
    expect(codeOf(() => authorize(null))).toBe("unauthenticated");
    expect(codeOf(() => authorize(caller("clinician", false)))).toBe("unauthenticated");
  });
});

describe("authorize while a password set by an administrator awaits replacement", () => {
  // The requirement: until the person chooses their own password they may do nothing else, only
  // change it (and sign out, which is next-auth's and needs no permission).
  it("refuses every permission and the signed-in-only checks, for every role, with 403 and a message saying what to do", () => {
    for (const role of ROLES) {
      for (const permission of [undefined, ...(Object.keys(PERMISSIONS) as Permission[])]) {
        try {
          authorize(caller(role, true, true), permission);
          expect.unreachable();
        } catch (err) {
          expect(err).toBeInstanceOf(AppError);
          expect((err as AppError).status).toBe(403);
          expect((err as AppError).message).toBe(
            "An administrator set your password: choose your own before doing anything else. Sign in to Bellwether in a browser to change it.",
          );
        }
      }
    }
  });

  it("lets the person change their own password, and nothing beyond their role even then", () => {
    const c = caller("clinician", true, true);
    expect(authorize(c, undefined, { whilePasswordChangeRequired: true })).toBe(c);
    expect(codeOf(() => authorize(c, "users:manage", { whilePasswordChangeRequired: true }))).toBe("forbidden");
    expect(codeOf(() => authorize(caller("clinician", false, true), undefined, { whilePasswordChangeRequired: true }))).toBe("unauthenticated");
  });
});
