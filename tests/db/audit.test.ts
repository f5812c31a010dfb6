import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { listAuditEvents, recordAuditEvent, SYSTEM_ACTOR } from "@/db/queries/audit";
import { auditEvents } from "@/db/schema";
import { testDatabase } from "../support/database";
import { appUrl, ownerUrl, pgError } from "../support/scratch-database";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

async function marker(): Promise<number> {
  const summary = `append-only check ${Date.now()} ${Math.random()}`;
  await recordAuditEvent(database, { actor: SYSTEM_ACTOR, action: "test.marker", entityType: "test", summary });
  const [row] = await database.select().from(auditEvents).where(eq(auditEvents.summary, summary));
  return row.id;
}

// PostgreSQL's messages and SQLSTATE 42501 (insufficient_privilege), as PostgreSQL 15 words them.
const denied = (what: string) => ({ code: "42501", message: `permission denied for ${what}` });
const notOwner = { code: "42501", message: "must be owner of table audit_events" };
// The trigger's own message (drizzle/0001_audit-append-only.sql), also raised as 42501.
const appendOnly = (op: string) => ({ code: "42501", message: `audit_events is append-only: ${op} is not allowed` });

describe("the audit trail is append-only, enforced by PostgreSQL", () => {
  it("the app's role adds and reads events, and may not change, remove or empty them", async () => {
    const id = await marker();
    expect(await pgError(appUrl(), `UPDATE audit_events SET summary = 'rewritten' WHERE id = ${id}`)).toEqual(denied("table audit_events"));
    expect(await pgError(appUrl(), `DELETE FROM audit_events WHERE id = ${id}`)).toEqual(denied("table audit_events"));
    expect(await pgError(appUrl(), "TRUNCATE audit_events")).toEqual(denied("table audit_events"));
    const [after] = await database.select().from(auditEvents).where(eq(auditEvents.id, id));
    expect(after.summary).toMatch(/^append-only check /);
  });

  it("the app's role cannot switch the triggers off", async () => {
    expect(await pgError(appUrl(), "ALTER TABLE audit_events DISABLE TRIGGER ALL")).toEqual(notOwner);
    expect(await pgError(appUrl(), "ALTER TABLE audit_events DISABLE TRIGGER audit_events_no_update_delete")).toEqual(notOwner);
    expect(await pgError(appUrl(), "ALTER TABLE audit_events DISABLE TRIGGER audit_events_no_truncate")).toEqual(notOwner);
  });

  it("even the owner is refused UPDATE, DELETE and TRUNCATE by the triggers", async () => {
    const id = await marker();
    expect(await pgError(ownerUrl(), `UPDATE audit_events SET summary = 'rewritten' WHERE id = ${id}`)).toEqual(appendOnly("UPDATE"));
    expect(await pgError(ownerUrl(), `DELETE FROM audit_events WHERE id = ${id}`)).toEqual(appendOnly("DELETE"));
    // The hash chain's links reference the events (drizzle/0013), so a plain TRUNCATE stops at
    // the foreign key, and one with CASCADE at the triggers (PostgreSQL 15's wording).
    expect(await pgError(ownerUrl(), "TRUNCATE audit_events")).toEqual({ code: "0A000", message: "cannot truncate a table referenced in a foreign key constraint" });
    expect(await pgError(ownerUrl(), "TRUNCATE audit_events CASCADE")).toEqual(appendOnly("TRUNCATE"));
    const [after] = await database.select().from(auditEvents).where(eq(auditEvents.id, id));
    expect(after.summary).toMatch(/^append-only check /);
  });

  it("lists events newest first with filters and a total", async () => {
    const tag = `filter-${Date.now()}`;
    for (const action of ["test.alpha", "test.beta", "test.alpha"]) {
      await recordAuditEvent(database, { actor: { id: null, label: `${tag}@example.test` }, action, entityType: "test", summary: `${tag} ${action}` });
    }
    const { rows, total } = await listAuditEvents(database, { filter: { actor: tag, action: "test.alpha" }, limit: 10, offset: 0 });
    expect(total).toBe(2);
    expect(rows.map((r) => r.action)).toEqual(["test.alpha", "test.alpha"]);
    expect(rows[0].id).toBeGreaterThan(rows[1].id);

    const byText = await listAuditEvents(database, { filter: { text: `${tag} test.beta` }, limit: 10, offset: 0 });
    expect(byText.total).toBe(1);
    // LIKE wildcards in the filter are taken literally.
    const literal = await listAuditEvents(database, { filter: { actor: "%" }, limit: 1, offset: 0 });
    expect(literal.total).toBe(0);
  });
});
