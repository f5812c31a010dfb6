import { and, desc, eq, sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { SYSTEM_ACTOR } from "@/db/queries/audit";
import { createUser } from "@/db/queries/users";
import { auditEvents } from "@/db/schema";
import { testDatabase, uniqueEmail } from "../support/database";
import { BASE_URL } from "../support/http-session";
import { attemptSignIn, freshAddress, freshIpv6Network } from "../support/sign-in-attempt";

// scripts/run-tests.ts serves the app with 3 free failures per e-mail and address, a first wait
// of 30 seconds doubling up to 15 minutes, 10 failures per address, a 60-minute window, and
// 127.0.0.1 as the trusted proxy.
const { database, pool } = testDatabase();
afterAll(() => pool.end());

const INVALID = "The e-mail or password is not right.";
const accountWait = (wait: string) => `Too many failed sign-ins for this e-mail from your address. Wait ${wait} before trying again.`;
const addressWait = (wait: string) => `Too many failed sign-ins from your address. Wait ${wait} before trying again.`;

async function newUser(tag: string) {
  const email = uniqueEmail(tag);
  const password = `${tag}-correct-password`;
  const user = await createUser(database, { input: { email, name: `Throttle ${tag}`, role: "clinician", password }, actor: SYSTEM_ACTOR });
  return { id: user.id, email, password };
}

async function messageOf(email: string, password: string, from: string, headers?: Record<string, string>): Promise<string> {
  const result = await attemptSignIn(email, password, { from, headers });
  return result.ok ? "signed in" : result.message;
}

/** Lets a running wait run out, as if its time had passed (the row is the server's record). */
async function endWait(email: string, bucket: string) {
  await database.execute(
    sql`update sign_in_account_failures set blocked_until = now() - interval '1 second' where email = ${email} and address = ${bucket}`,
  );
}

async function auditFor(action: string, email: string) {
  return database
    .select()
    .from(auditEvents)
    .where(and(eq(auditEvents.action, action), sql`${auditEvents.details}->>'email' = ${email}`))
    .orderBy(desc(auditEvents.id));
}

describe("failed sign-ins for one e-mail from one address", () => {
  it("make that address wait, while the right password from another address still signs in", async () => {
    const user = await newUser("elsewhere");
    const attacker = freshAddress();
    for (let i = 0; i < 3; i++) expect(await messageOf(user.email, `wrong-${i}`, attacker)).toBe(INVALID);
    expect(await messageOf(user.email, "wrong-3", attacker)).toBe(accountWait("30 seconds"));

    // Even the right password waits at that address...
    const refused = await messageOf(user.email, user.password, attacker);
    const seconds = Number(/^Too many failed sign-ins for this e-mail from your address\. Wait (\d+) seconds? before trying again\.$/.exec(refused)?.[1]);
    expect(seconds).toBeGreaterThanOrEqual(1);
    expect(seconds).toBeLessThanOrEqual(30);

    // ...but the person, elsewhere, is not locked out.
    const person = await attemptSignIn(user.email, user.password, { from: freshAddress() });
    expect(person.ok).toBe(true);
    if (!person.ok) return;
    const me = await fetch(`${BASE_URL}/api/v1/me`, { headers: { cookie: person.cookie } });
    expect(me.status).toBe(200);
    expect((await me.json()).email).toBe(user.email);
  });

  it("wait twice as long after each further failure, up to 15 minutes, and the audit trail records each wait", async () => {
    const user = await newUser("doubling");
    const from = freshAddress();
    for (let i = 0; i < 3; i++) await messageOf(user.email, `wrong-${i}`, from);
    const stated: string[] = [];
    for (let i = 3; i < 9; i++) {
      stated.push(await messageOf(user.email, `wrong-${i}`, from));
      await endWait(user.email, from);
    }
    expect(stated).toEqual(["30 seconds", "1 minute", "2 minutes", "4 minutes", "8 minutes", "15 minutes"].map(accountWait));

    const events = await auditFor("auth.locked", user.email);
    expect(events.map((e) => (e.details as { waitSeconds: number }).waitSeconds)).toEqual([900, 480, 240, 120, 60, 30]);
    expect(events[5].summary).toBe(`Sign-in for ${user.email} from ${from} held for 30 seconds after 4 failed attempts`);
    expect(events[5].details).toEqual({ email: user.email, address: from, bucket: from, failures: 4, waitSeconds: 30 });
    expect(events[5].entityId).toBe(user.id);
  });

  it("start afresh after the right password", async () => {
    const user = await newUser("afresh");
    const from = freshAddress();
    for (let i = 0; i < 3; i++) await messageOf(user.email, `wrong-${i}`, from);
    expect(await messageOf(user.email, user.password, from)).toBe("signed in");
    for (let i = 0; i < 3; i++) expect(await messageOf(user.email, `again-${i}`, from)).toBe(INVALID);
    expect(await messageOf(user.email, "again-3", from)).toBe(accountWait("30 seconds"));
  });

  it("count IPv6 clients by their /64, so changing the last bits does not start afresh", async () => {
    const user = await newUser("ipv6");
    const network = freshIpv6Network();
    for (let i = 1; i <= 3; i++) expect(await messageOf(user.email, `wrong-${i}`, `${network}::${i}`)).toBe(INVALID);
    expect(await messageOf(user.email, "wrong-4", `${network}::4`)).toBe(accountWait("30 seconds"));
    expect(await messageOf(user.email, user.password, `${network}:0:0:0:5`)).toMatch(/^Too many failed sign-ins for this e-mail/);
    const [event] = await auditFor("auth.locked", user.email);
    expect(event.summary).toBe(`Sign-in for ${user.email} from ${network}::4 (counted as ${network}::/64) held for 30 seconds after 4 failed attempts`);
  });
});

describe("failed sign-ins from one address across e-mails", () => {
  it("hold the address at the limit, whatever e-mail it tries next; other addresses are unaffected", async () => {
    const user = await newUser("across");
    const from = freshAddress();
    const tried = Array.from({ length: 10 }, (_, i) => uniqueEmail(`spray-${i}`));
    for (const email of tried.slice(0, 9)) expect(await messageOf(email, "Winter2026!", from)).toBe(INVALID);
    expect(await messageOf(tried[9], "Winter2026!", from)).toBe(addressWait("60 minutes"));

    expect(await messageOf(user.email, user.password, from)).toMatch(
      /^Too many failed sign-ins from your address\. Wait (60|59) minutes before trying again\.$/,
    );
    expect(await messageOf(user.email, user.password, freshAddress())).toBe("signed in");

    const [event] = await auditFor("auth.address_locked", tried[9]);
    expect(event.summary).toBe(`Sign-ins from ${from} held for 60 minutes after 10 failed attempts for any e-mail (the last for ${tried[9]})`);
    expect(event.entityType).toBe("client_address");
    expect(event.entityId).toBe(from);
    expect(event.details).toEqual({ email: tried[9], address: from, bucket: from, failures: 10, waitSeconds: 3600 });
  });
});

describe("the client address", () => {
  it("cannot be chosen by a header the client sends", async () => {
    const user = await newUser("spoof");
    const from = freshAddress();
    for (let i = 0; i < 4; i++) {
      // A fresh forged address every time: if it were believed, every attempt would start afresh.
      await messageOf(user.email, `wrong-${i}`, from, { "x-bellwether-client-address": freshAddress() });
    }
    const [event] = await auditFor("auth.locked", user.email);
    expect(event.details).toMatchObject({ address: from, failures: 4 });
  });

  it("is the right-most forwarded entry, not one the client put to its left", async () => {
    const user = await newUser("chain");
    const real = freshAddress();
    for (let i = 0; i < 4; i++) await messageOf(user.email, `wrong-${i}`, `${freshAddress()}, ${real}`);
    const [event] = await auditFor("auth.locked", user.email);
    expect(event.details).toMatchObject({ address: real, failures: 4 });
  });
});
