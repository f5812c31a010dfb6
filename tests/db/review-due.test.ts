import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Database } from "@/db/client";
import { migrateDatabase } from "@/db/migrate";
import * as schema from "@/db/schema";
import { seedDemo } from "@/db/seed";
import { queueReviewDueMessages } from "@/lib/mail/review-due";
import { createScratchDatabase, queryRows, SUPERUSER_URL, type ScratchDatabase } from "../support/scratch-database";

// A seeded database of its own, so that the review-by dates set here touch no other test and the
// served app's own daily job does not queue into it.
let scratch: ScratchDatabase;
let pool: Pool;
let database: Database;
const versions: Record<string, string> = {};
let directors: string[];

const TODAY = new Date("2031-06-01T06:00:00Z");
const days = (n: number) => new Date(TODAY.getTime() + n * 86_400_000);
const clockAt = (d: Date) => () => d;

beforeAll(async () => {
  if (!SUPERUSER_URL) return;
  scratch = await createScratchDatabase("review");
  await migrateDatabase(scratch.ownerUrl);
  pool = new Pool({ connectionString: scratch.appUrl, max: 4 });
  database = drizzle(pool, { schema }) as Database;
  await seedDemo(database);
  const inForce = await queryRows<{ id: string; code: string }>(
    scratch.appUrl,
    "SELECT v.id, a.code FROM interval_versions v JOIN analytes a ON a.id = v.analyte_id WHERE v.state = 'in_force'",
  );
  for (const v of inForce) versions[v.code] = v.id;
  // Review-by dates chosen for the test, as the schema's owner: sodium due in 30 days, glucose
  // overdue by 10, potassium due in 61.5 days (outside the 60-day window until day 1.5), the rest far off.
  await queryRows(scratch.ownerUrl, `UPDATE interval_versions SET review_by = '${days(4000).toISOString()}' WHERE state = 'in_force'`);
  const set = (code: string, d: Date) => queryRows(scratch.ownerUrl, `UPDATE interval_versions SET review_by = '${d.toISOString()}' WHERE id = '${versions[code]}'`);
  await set("NA", days(30));
  await set("GLU", days(-10));
  await set("K", days(61.5));
  directors = (await queryRows<{ email: string }>(scratch.appUrl, "SELECT email FROM users WHERE role = 'director' AND active ORDER BY email")).map((r) => r.email);
});
afterAll(async () => {
  await pool?.end();
  await scratch?.drop();
});

async function reviewMessages() {
  return queryRows<{ entity_id: string; recipients: string[]; subject: string; text: string; created_at: Date }>(
    scratch.appUrl,
    "SELECT entity_id, recipients, subject, text, created_at FROM outbox WHERE kind = 'version.review_due' ORDER BY created_at, subject",
  );
}

describe.skipIf(!SUPERUSER_URL)("the review-due job, on a fake clock", () => {
  it("queues one message to the directors for each in-force version due within 60 days or overdue", async () => {
    expect(directors.length).toBeGreaterThan(0);
    expect(await queueReviewDueMessages({ database, clock: clockAt(TODAY), appUrl: "https://bellwether.lab.example" })).toEqual({ queued: 2 });
    const messages = await reviewMessages();
    expect(messages.map((m) => m.entity_id).sort()).toEqual([versions.GLU, versions.NA].sort());
    for (const m of messages) {
      expect([...m.recipients].sort()).toEqual(directors);
      expect(m.created_at).toEqual(TODAY);
    }
    const glucose = messages.find((m) => m.entity_id === versions.GLU)!;
    expect(glucose.subject).toMatch(/^Review overdue: Glucose \(GLU\) interval version 1$/);
    expect(glucose.text).toContain("is due for review by 2031-05-22: overdue by 10 days.");
    expect(glucose.text).toContain(`Open the version: https://bellwether.lab.example/versions/${versions.GLU}`);
    const sodium = messages.find((m) => m.entity_id === versions.NA)!;
    expect(sodium.subject).toMatch(/^Review due in 30 days: Sodium \(NA\) interval version 1$/);
  });

  it("queues nothing again the next day, nor when two runs go at once", async () => {
    expect(await queueReviewDueMessages({ database, clock: clockAt(days(1)) })).toEqual({ queued: 0 });
    // Potassium's window opens on day 1.5 (60 days before its review-by date): queued once, by one of two runs.
    const both = await Promise.all([
      queueReviewDueMessages({ database, clock: clockAt(days(1.5)) }),
      queueReviewDueMessages({ database, clock: clockAt(days(1.5)) }),
    ]);
    expect(both.map((r) => r.queued).sort()).toEqual([0, 1]);
    expect(await queueReviewDueMessages({ database, clock: clockAt(days(2)) })).toEqual({ queued: 0 });
    const messages = await reviewMessages();
    expect(messages.map((m) => m.entity_id).sort()).toEqual([versions.GLU, versions.NA, versions.K].sort());
  });

  it("queues again in the next review period, once the review-by date has moved on", async () => {
    // A review signed on day 5 sets sodium's next review-by date two years on.
    const next = days(30 + 730);
    await queryRows(scratch.ownerUrl, `UPDATE interval_versions SET review_by = '${next.toISOString()}' WHERE id = '${versions.NA}'`);
    expect(await queueReviewDueMessages({ database, clock: clockAt(days(6)) })).toEqual({ queued: 0 });
    expect(await queueReviewDueMessages({ database, clock: clockAt(days(30 + 730 - 59)) })).toEqual({ queued: 1 });
    expect(await queueReviewDueMessages({ database, clock: clockAt(days(30 + 730 - 58)) })).toEqual({ queued: 0 });
    const sodium = (await reviewMessages()).filter((m) => m.entity_id === versions.NA);
    expect(sodium).toHaveLength(2);
  });
});
