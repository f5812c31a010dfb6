import "server-only";
import { and, asc, eq, ne, sql } from "drizzle-orm";
import { AppError } from "@/lib/api/errors";
import { hashPassword } from "@/lib/auth/password";
import type { Database, Executor } from "../client";
import { isPublishedDemoPassword } from "../demo-accounts";
import { users, type Role, type User } from "../schema";
import { recordAuditEvent, type Actor } from "./audit";

export type PublicUser = Omit<User, "passwordHash">;

const publicColumns = {
  id: users.id,
  email: users.email,
  name: users.name,
  role: users.role,
  active: users.active,
  createdAt: users.createdAt,
  updatedAt: users.updatedAt,
  deactivatedAt: users.deactivatedAt,
  lastSignInAt: users.lastSignInAt,
  sessionVersion: users.sessionVersion,
  mustChangePassword: users.mustChangePassword,
};

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}

export async function findUserByEmail(executor: Executor, { email }: { email: string }): Promise<User | undefined> {
  const [row] = await executor.select().from(users).where(eq(users.email, normaliseEmail(email))).limit(1);
  return row;
}

export async function findUserById(executor: Executor, { id }: { id: string }): Promise<PublicUser | undefined> {
  const [row] = await executor.select(publicColumns).from(users).where(eq(users.id, id)).limit(1);
  return row;
}

export async function listUsers(executor: Executor): Promise<PublicUser[]> {
  return executor.select(publicColumns).from(users).orderBy(asc(users.name));
}

export async function countUsers(executor: Executor): Promise<number> {
  const [{ n }] = await executor.select({ n: sql<number>`count(*)::int` }).from(users);
  return n;
}

export async function recordSignIn(executor: Executor, { id }: { id: string }): Promise<void> {
  await executor.update(users).set({ lastSignInAt: new Date() }).where(eq(users.id, id));
}

export interface CreateUserInput {
  email: string;
  name: string;
  role: Role;
  password: string;
  /** The password was chosen by someone else (an administrator, the create-admin command). */
  mustChangePassword?: boolean;
}

export const PUBLISHED_PASSWORD_MESSAGE =
  "That password is published in Bellwether's README for the demo accounts, so anyone could use it; choose another.";

/** The demo's passwords are public: no account may be given one, except by the demo seed itself. */
function assertNotPublished(password: string): void {
  if (isPublishedDemoPassword(password)) throw new AppError("invalid", PUBLISHED_PASSWORD_MESSAGE);
}

export async function createUser(
  database: Database,
  { input, actor, allowPublishedPassword = false }: { input: CreateUserInput; actor: Actor; allowPublishedPassword?: boolean },
): Promise<PublicUser> {
  if (!allowPublishedPassword) assertNotPublished(input.password);
  const email = normaliseEmail(input.email);
  const passwordHash = await hashPassword(input.password);
  return database.transaction(async (tx) => {
    const existing = await tx.select({ id: users.id }).from(users).where(eq(users.email, email)).limit(1);
    if (existing.length > 0) throw new AppError("conflict", `A user with the e-mail ${email} already exists.`);
    const [created] = await tx
      .insert(users)
      .values({ email, name: input.name.trim(), role: input.role, passwordHash, mustChangePassword: input.mustChangePassword ?? false })
      .returning(publicColumns);
    await recordAuditEvent(tx, {
      actor,
      action: "user.created",
      entityType: "user",
      entityId: created.id,
      summary: `Created ${created.name} <${created.email}> as ${created.role}`,
      details: { email: created.email, role: created.role, mustChangePassword: created.mustChangePassword },
    });
    return created;
  });
}

/** Refuses a change that would leave the laboratory without an active administrator. */
async function assertAnotherActiveAdmin(tx: Executor, userId: string): Promise<void> {
  const [{ n }] = await tx
    .select({ n: sql<number>`count(*)::int` })
    .from(users)
    .where(and(eq(users.role, "admin"), eq(users.active, true), ne(users.id, userId)));
  if (n === 0) {
    throw new AppError("conflict", "This is the last active administrator; make another user an administrator first.");
  }
}

async function lockUser(tx: Executor, id: string): Promise<User> {
  const [row] = await tx.select().from(users).where(eq(users.id, id)).for("update");
  if (!row) throw new AppError("not_found", "No such user.");
  return row;
}

export async function changeUserRole(
  database: Database,
  { id, role, actor }: { id: string; role: Role; actor: Actor },
): Promise<void> {
  await database.transaction(async (tx) => {
    const user = await lockUser(tx, id);
    if (user.role === role) return;
    if (user.role === "admin" && user.active) await assertAnotherActiveAdmin(tx, id);
    await tx
      .update(users)
      .set({ role, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() })
      .where(eq(users.id, id));
    await recordAuditEvent(tx, {
      actor,
      action: "user.role_changed",
      entityType: "user",
      entityId: id,
      summary: `Changed the role of ${user.email} from ${user.role} to ${role}`,
      details: { from: user.role, to: role },
    });
  });
}

export async function setUserActive(
  database: Database,
  { id, active, actor }: { id: string; active: boolean; actor: Actor },
): Promise<void> {
  await database.transaction(async (tx) => {
    const user = await lockUser(tx, id);
    if (user.active === active) return;
    if (!active && actor.id === id) throw new AppError("conflict", "You cannot deactivate your own account.");
    if (!active && user.role === "admin") await assertAnotherActiveAdmin(tx, id);
    await tx
      .update(users)
      .set({
        active,
        deactivatedAt: active ? null : new Date(),
        sessionVersion: sql`${users.sessionVersion} + 1`,
        updatedAt: new Date(),
      })
      .where(eq(users.id, id));
    await recordAuditEvent(tx, {
      actor,
      action: active ? "user.reactivated" : "user.deactivated",
      entityType: "user",
      entityId: id,
      summary: `${active ? "Reactivated" : "Deactivated"} ${user.email}`,
    });
  });
}

/**
 * Sets a new password and ends every session of the user signed in before (the session version
 * goes up). A password set by someone other than the person (an administrator's reset) must be
 * changed at the next sign-in; one the person chose clears that demand. Returns the new session
 * version, which the person's own session may take up through a ticket (lib/auth/session-ticket.ts).
 */
export async function changePassword(
  database: Database,
  { id, password, actor }: { id: string; password: string; actor: Actor },
): Promise<{ sessionVersion: number }> {
  assertNotPublished(password);
  const passwordHash = await hashPassword(password);
  const own = actor.id === id;
  return database.transaction(async (tx) => {
    const user = await lockUser(tx, id);
    const [updated] = await tx
      .update(users)
      .set({ passwordHash, mustChangePassword: !own, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() })
      .where(eq(users.id, id))
      .returning({ sessionVersion: users.sessionVersion });
    await recordAuditEvent(tx, {
      actor,
      action: "user.password_changed",
      entityType: "user",
      entityId: id,
      summary: own
        ? `${user.email} changed their password`
        : `Set a new password for ${user.email}, to be changed at the next sign-in`,
      details: { mustChangePassword: !own },
    });
    return updated;
  });
}
