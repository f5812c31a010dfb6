import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { admitSignInAttempt, settleSuccessfulSignIn, type SignInAttempt } from "@/db/queries/sign-in-throttle";
import { signInAccountFailures, signInAddressFailures } from "@/db/schema";
import type { ThrottlePolicy } from "@/lib/auth/sign-in-throttle";
import { testDatabase, uniqueEmail } from "../support/database";
import { freshAddress } from "../support/sign-in-attempt";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

// The README's defaults, but 5 failures per address so that the limit is reached in a few steps.
const policy: ThrottlePolicy = { freeFailures: 3, firstDelaySeconds: 30, maxDelaySeconds: 900, addressMaxFailures: 5, windowSeconds: 3600 };

function attemptBy(email: string, address = freshAddress()): SignInAttempt {
  return { email, address, bucket: address };
}

async function accountRow(a: SignInAttempt) {
  const [row] = await database
    .select()
    .from(signInAccountFailures)
    .where(and(eq(signInAccountFailures.email, a.email), eq(signInAccountFailures.address, a.bucket)));
  return row;
}

async function addressRow(a: SignInAttempt) {
  const [row] = await database.select().from(signInAddressFailures).where(eq(signInAddressFailures.address, a.bucket));
  return row;
}

describe("admitting sign-in attempts on the real database", () => {
  it("charges a burst of parallel attempts one after another: only the free ones and the one that starts the wait get through", async () => {
    const attempt = attemptBy(uniqueEmail("burst"));
    const now = new Date();
    const results = await Promise.all(Array.from({ length: 12 }, () => admitSignInAttempt(database, { attempt, policy: { ...policy, addressMaxFailures: 100 }, now })));
    const admitted = results.filter((r) => r.admitted);
    expect(admitted).toHaveLength(4);
    expect(results.filter((r) => !r.admitted).every((r) => !r.admitted && r.scope === "account" && r.waitSeconds === 30)).toBe(true);
    expect((await accountRow(attempt)).failures).toBe(4);
  });

  it("refuses at the address limit across e-mails without charging the e-mail", async () => {
    const address = freshAddress();
    const now = new Date();
    for (let i = 0; i < 5; i++) {
      expect(await admitSignInAttempt(database, { attempt: attemptBy(uniqueEmail(`limit-${i}`), address), policy, now })).toMatchObject({ admitted: true });
    }
    const next = attemptBy(uniqueEmail("limit-next"), address);
    expect(await admitSignInAttempt(database, { attempt: next, policy, now })).toEqual({ admitted: false, scope: "address", waitSeconds: 3600 });
    expect(await accountRow(next)).toBeUndefined();
  });

  it("gives a right password's charge back: the e-mail starts afresh, the address keeps its other failures", async () => {
    const address = freshAddress();
    const other = attemptBy(uniqueEmail("other"), address);
    const person = attemptBy(uniqueEmail("person"), address);
    const now = new Date();
    await admitSignInAttempt(database, { attempt: other, policy, now });
    await admitSignInAttempt(database, { attempt: person, policy, now });
    await admitSignInAttempt(database, { attempt: person, policy, now });
    expect((await addressRow(person)).failures).toBe(3);
    await database.transaction((tx) => settleSuccessfulSignIn(tx, { attempt: person, policy }));
    expect(await accountRow(person)).toBeUndefined();
    expect((await addressRow(person)).failures).toBe(2);
  });

  it("forgets counters after a quiet window", async () => {
    const attempt = attemptBy(uniqueEmail("quiet"));
    const then = new Date(Date.now() - 2 * 3600 * 1000);
    for (let i = 0; i < 4; i++) await admitSignInAttempt(database, { attempt, policy, now: then });
    expect((await accountRow(attempt)).failures).toBe(4);
    // Any later attempt, by anyone, clears what has been quiet for the window.
    await admitSignInAttempt(database, { attempt: attemptBy(uniqueEmail("someone")), policy });
    expect(await accountRow(attempt)).toBeUndefined();
    expect(await addressRow(attempt)).toBeUndefined();
  });
});
