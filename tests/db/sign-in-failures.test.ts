import { sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { clearFailures, minutesLocked, recordFailure } from "@/db/queries/sign-in-failures";
import { testDatabase, uniqueEmail } from "../support/database";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

const policy = { maxFailures: 3, lockMinutes: 10 };

describe("sign-in throttling", () => {
  it("locks an address after the maximum failures within the window, then clears on success", async () => {
    const email = uniqueEmail("throttle");
    expect(await recordFailure(database, { email, policy })).toBe(0);
    expect(await recordFailure(database, { email, policy })).toBe(0);
    expect(await minutesLocked(database, { email })).toBe(0);
    expect(await recordFailure(database, { email, policy })).toBe(10);
    expect(await minutesLocked(database, { email })).toBe(10);
    await clearFailures(database, { email });
    expect(await minutesLocked(database, { email })).toBe(0);
  });

  it("forgets failures older than the window", async () => {
    const email = uniqueEmail("window");
    await recordFailure(database, { email, policy });
    await recordFailure(database, { email, policy });
    await database.execute(sql`update sign_in_failures set first_failure_at = now() - interval '11 minutes' where email = ${email}`);
    expect(await recordFailure(database, { email, policy })).toBe(0);
    const rows = await database.execute(sql`select failures from sign_in_failures where email = ${email}`);
    expect(rows.rows[0]).toEqual({ failures: 1 });
  });

  it("starts counting afresh once a lock has expired", async () => {
    const email = uniqueEmail("expired");
    for (let i = 0; i < 3; i++) await recordFailure(database, { email, policy });
    await database.execute(sql`update sign_in_failures set locked_until = now() - interval '1 second' where email = ${email}`);
    expect(await minutesLocked(database, { email })).toBe(0);
    expect(await recordFailure(database, { email, policy })).toBe(0);
  });
});
