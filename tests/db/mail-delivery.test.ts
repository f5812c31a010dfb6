import { drizzle } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Database } from "@/db/client";
import { migrateDatabase } from "@/db/migrate";
import { queueMessage } from "@/db/queries/outbox";
import * as schema from "@/db/schema";
import { deliverDueMessages } from "@/lib/mail/delivery";
import { startFakeMailProvider, type FakeMailProvider } from "@/lib/mail/fake-server";
import { resendSender, type MailSender } from "@/lib/mail/sender";
import { createScratchDatabase, SUPERUSER_URL, type ScratchDatabase } from "../support/scratch-database";

// A database of its own: the served app's mail job delivers from the shared test database and
// would race these runs for their messages.
let scratch: ScratchDatabase;
let pool: Pool;
let database: Database;
let fake: FakeMailProvider;
let sender: MailSender;
const FROM = "Bellwether <bellwether@lab.example>";

beforeAll(async () => {
  if (!SUPERUSER_URL) return;
  scratch = await createScratchDatabase("mail");
  await migrateDatabase(scratch.ownerUrl);
  pool = new Pool({ connectionString: scratch.appUrl, max: 6 });
  database = drizzle(pool, { schema }) as Database;
  fake = await startFakeMailProvider();
  sender = resendSender({ apiKey: "re_dummy_for_tests", baseUrl: fake.url });
});
afterAll(async () => {
  await fake?.close();
  await pool?.end();
  await scratch?.drop();
});

const at = (iso: string) => () => new Date(iso);

async function queue(subject: string, recipients = ["Director@Lab.example", "scientist@lab.example"]) {
  const row = await queueMessage(database, { kind: "version.submitted", recipients, subject, text: `Text of ${subject}` });
  return row!.id;
}

async function row(id: string) {
  const { rows } = await pool.query(
    "SELECT status, attempts, last_error, provider_id, next_attempt_at, sent_at FROM outbox WHERE id = $1",
    [id],
  );
  return rows[0];
}

describe.skipIf(!SUPERUSER_URL)("delivering the outbox through the fake provider", () => {
  it("delivers a queued message to its recipients and marks it sent with the provider's id", async () => {
    const id = await queue("Sodium version 2 awaits sign-off");
    const report = await deliverDueMessages({ database, sender, from: FROM, clock: at("2030-01-01T10:00:00Z") });
    expect(report).toEqual({ sent: 1, retrying: 0, failed: 0 });
    const captured = fake.messages().filter((m) => m.subject === "Sodium version 2 awaits sign-off");
    expect(captured).toHaveLength(1);
    // queueMessage stores addresses trimmed and in lower case.
    expect(captured[0]).toMatchObject({
      from: FROM,
      to: ["director@lab.example", "scientist@lab.example"],
      text: "Text of Sodium version 2 awaits sign-off",
      idempotencyKey: id,
    });
    expect(await row(id)).toEqual({
      status: "sent",
      attempts: 1,
      last_error: null,
      provider_id: captured[0].id,
      next_attempt_at: expect.any(Date),
      sent_at: new Date("2030-01-01T10:00:00Z"),
    });
  });

  it("keeps the message queued with one attempt when the provider fails, and delivers it on a later run", async () => {
    const id = await queue("Potassium version 3 returned");
    fake.failNext(1);
    expect(await deliverDueMessages({ database, sender, from: FROM, clock: at("2030-01-02T10:00:00Z") })).toEqual({ sent: 0, retrying: 1, failed: 0 });
    expect(await row(id)).toMatchObject({
      status: "queued",
      attempts: 1,
      last_error: "500 internal_server_error: The local fake provider was told to fail this request.",
      provider_id: null,
      // One minute of back-off after the first failure.
      next_attempt_at: new Date("2030-01-02T10:01:00Z"),
    });
    expect(fake.messages().filter((m) => m.subject === "Potassium version 3 returned")).toHaveLength(0);
    // Not due yet: a run within the back-off leaves it alone.
    expect(await deliverDueMessages({ database, sender, from: FROM, clock: at("2030-01-02T10:00:30Z") })).toEqual({ sent: 0, retrying: 0, failed: 0 });
    expect(await deliverDueMessages({ database, sender, from: FROM, clock: at("2030-01-02T10:01:00Z") })).toEqual({ sent: 1, retrying: 0, failed: 0 });
    expect(await row(id)).toMatchObject({ status: "sent", attempts: 2, last_error: null });
    expect(fake.messages().filter((m) => m.subject === "Potassium version 3 returned")).toHaveLength(1);
  });

  it("marks a message failed after the limit of attempts, keeps it, and audits the failure", async () => {
    const id = await queue("Calcium version 1 signed off");
    fake.failNext(3);
    const clocks = ["2030-01-03T10:00:00Z", "2030-01-03T10:01:00Z", "2030-01-03T10:03:00Z"];
    const reports = [];
    for (const iso of clocks) reports.push(await deliverDueMessages({ database, sender, from: FROM, clock: at(iso), maxAttempts: 3 }));
    expect(reports).toEqual([
      { sent: 0, retrying: 1, failed: 0 },
      { sent: 0, retrying: 1, failed: 0 },
      { sent: 0, retrying: 0, failed: 1 },
    ]);
    expect(await row(id)).toMatchObject({ status: "failed", attempts: 3, provider_id: null });
    // A failed message is not tried again.
    expect(await deliverDueMessages({ database, sender, from: FROM, clock: at("2030-02-01T00:00:00Z") })).toEqual({ sent: 0, retrying: 0, failed: 0 });
    const { rows } = await pool.query("SELECT actor_label, action, summary FROM audit_events WHERE entity_id = $1", [id]);
    expect(rows).toEqual([
      {
        actor_label: "system",
        action: "outbox.failed",
        summary:
          'E-mail "Calcium version 1 signed off" to director@lab.example, scientist@lab.example failed after 3 attempts: 500 internal_server_error: The local fake provider was told to fail this request.',
      },
    ]);
  });

  it("sends each message once when two delivery runs go at the same time", async () => {
    const subjects = Array.from({ length: 12 }, (_, i) => `Concurrent message ${i + 1}`);
    for (const s of subjects) await queue(s);
    const requestsBefore = fake.requests();
    // A slow provider, so that the two runs overlap for the whole batch.
    const slow: MailSender = { send: async (m) => (await new Promise((r) => setTimeout(r, 25)), sender.send(m)) };
    const clock = at("2030-01-04T10:00:00Z");
    const [a, b] = await Promise.all([
      deliverDueMessages({ database, sender: slow, from: FROM, clock }),
      deliverDueMessages({ database, sender: slow, from: FROM, clock }),
    ]);
    expect(a.sent + b.sent).toBe(12);
    expect(a.sent).toBeGreaterThan(0);
    expect(b.sent).toBeGreaterThan(0);
    expect(fake.requests() - requestsBefore).toBe(12);
    for (const s of subjects) expect(fake.messages().filter((m) => m.subject === s)).toHaveLength(1);
    const { rows } = await pool.query("SELECT status, attempts, count(*)::int AS n FROM outbox WHERE subject LIKE 'Concurrent message %' GROUP BY 1, 2");
    expect(rows).toEqual([{ status: "sent", attempts: 1, n: 12 }]);
  });
});
