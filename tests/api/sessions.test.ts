import { and, desc, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { changePassword, createUser, findUserByEmail, setUserActive } from "@/db/queries/users";
import { auditEvents } from "@/db/schema";
import { issueSessionTicket } from "@/lib/auth/session-ticket";
import { testDatabase, uniqueEmail } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

const PASSWORD_CHANGE_REQUIRED =
  "An administrator set your password: choose your own before doing anything else. Sign in to Bellwether in a browser to change it.";

async function newUser(tag: string, password: string) {
  const email = uniqueEmail(tag);
  const user = await createUser(database, { input: { email, name: `Sessions ${tag}`, role: "scientist", password }, actor: SYSTEM_ACTOR });
  return { id: user.id, email };
}

async function me(cookie: string): Promise<Response> {
  return fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie } });
}

async function adminActor() {
  const admin = await findUserByEmail(database, { email: demoUser("admin").email });
  return { id: admin!.id, label: admin!.email };
}

function sessionCookieOf(res: Response): string | undefined {
  return res.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .find((c) => c.startsWith("next-auth.session-token="));
}

/** next-auth's session update, as `useSession().update(data)` sends it. */
async function updateSession(cookie: string, data: unknown): Promise<{ body: unknown; cookie: string }> {
  const { csrfToken } = (await (await fetch(`${BASE_URL}/api/auth/csrf`, { headers: { cookie } })).json()) as { csrfToken: string };
  const res = await fetch(`${BASE_URL}/api/auth/session`, {
    method: "POST",
    headers: { "content-type": "application/json", cookie },
    body: JSON.stringify({ csrfToken, data }),
  });
  const renewed = sessionCookieOf(res);
  const rest = cookie.split("; ").filter((c) => !c.startsWith("next-auth.session-token="));
  return { body: await res.json(), cookie: [...rest, ...(renewed ? [renewed] : [])].join("; ") };
}

async function sessionIdOf(cookie: string): Promise<string> {
  const session = (await (await fetch(`${BASE_URL}/api/auth/session`, { headers: { cookie } })).json()) as { user: { sessionId: string } };
  return session.user.sessionId;
}

describe("an administrator's password reset", () => {
  it("ends the person's sessions, and the new password opens nothing but the change of it", async () => {
    const user = await newUser("reset", "first-password-of-mine");
    const before = await signInOverHttp(user.email, "first-password-of-mine");
    expect((await me(before)).status).toBe(200);

    await changePassword(database, { id: user.id, password: "given-by-the-admin", actor: await adminActor() });

    const ended = await me(before);
    expect(ended.status).toBe(401);
    expect((await ended.json()).detail).toBe("Sign in to continue.");

    const after = await signInOverHttp(user.email, "given-by-the-admin");
    const refused = await me(after);
    expect(refused.status).toBe(403);
    expect(refused.headers.get("content-type")).toBe("application/problem+json");
    expect(await refused.json()).toEqual({
      type: "urn:bellwether:problem:forbidden",
      title: "Not allowed",
      status: 403,
      detail: PASSWORD_CHANGE_REQUIRED,
      instance: "/api/v1/me",
    });

    const [event] = await database
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.entityId, user.id), eq(auditEvents.action, "user.password_changed")))
      .orderBy(desc(auditEvents.id));
    expect(event.summary).toBe(`Set a new password for ${user.email}, to be changed at the next sign-in`);
    expect(event.actorLabel).toBe(demoUser("admin").email);
  });
});

describe("deactivation", () => {
  it("ends the sessions for good: reactivating the account does not bring them back", async () => {
    const user = await newUser("reactivated", "a-password-of-mine");
    const cookie = await signInOverHttp(user.email, "a-password-of-mine");
    await setUserActive(database, { id: user.id, active: false, actor: SYSTEM_ACTOR });
    await setUserActive(database, { id: user.id, active: true, actor: SYSTEM_ACTOR });
    const res = await me(cookie);
    expect(res.status).toBe(401);
    expect((await res.json()).detail).toBe("Sign in to continue.");
  });
});

describe("changing one's own password", () => {
  it("ends every session; one comes back only with a ticket issued to it", async () => {
    const user = await newUser("own", "the-old-password-1");
    const here = await signInOverHttp(user.email, "the-old-password-1");
    const elsewhere = await signInOverHttp(user.email, "the-old-password-1");
    const { sessionVersion } = await changePassword(database, {
      id: user.id,
      password: "the-new-password-1",
      actor: { id: user.id, label: user.email },
    });
    expect((await me(here)).status).toBe(401);
    expect((await me(elsewhere)).status).toBe(401);

    const secret = process.env.NEXTAUTH_SECRET!;
    const hereId = await sessionIdOf(here);
    const elsewhereId = await sessionIdOf(elsewhere);
    expect(hereId).not.toBe(elsewhereId);

    // No ticket, a forged one, one for the other session: the stale session stays ended.
    for (const data of [
      {},
      { sessionTicket: issueSessionTicket({ userId: user.id, sessionId: hereId, version: sessionVersion }, { secret: "x".repeat(40) }) },
      { sessionTicket: issueSessionTicket({ userId: user.id, sessionId: elsewhereId, version: sessionVersion }, { secret }) },
    ]) {
      const attempt = await updateSession(here, data);
      expect(attempt.body).toEqual({});
      expect((await me(attempt.cookie)).status).toBe(401);
    }

    const ticket = issueSessionTicket({ userId: user.id, sessionId: hereId, version: sessionVersion }, { secret });
    const renewed = await updateSession(here, { sessionTicket: ticket });
    const res = await me(renewed.cookie);
    expect(res.status).toBe(200);
    expect((await res.json()).email).toBe(user.email);
    expect((await me(elsewhere)).status).toBe(401);
  });
});
