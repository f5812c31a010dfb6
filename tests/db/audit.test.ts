import { eq, sql } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { listAuditEvents, recordAuditEvent, SYSTEM_ACTOR } from "@/db/queries/audit";
import { auditEvents } from "@/db/schema";
import { testDatabase } from "../support/database";

const { database, pool } = testDatabase();
afterAll(() => pool.end());

/** PostgreSQL's own message (drizzle wraps the driver's error as its cause). */
async function rejection(query: PromiseLike<unknown>): Promise<string> {
  try {
    await query;
  } catch (err) {
    const cause = (err as { cause?: { message?: string } }).cause;
    return cause?.message ?? (err as Error).message;
  }
  return "no error";
}

describe("the audit trail is append-only, enforced by PostgreSQL", () => {
  it("accepts inserts and rejects UPDATE, DELETE and TRUNCATE", async () => {
    const marker = `append-only check ${Date.now()}`;
    await recordAuditEvent(database, { actor: SYSTEM_ACTOR, action: "test.marker", entityType: "test", summary: marker });
    const [row] = await database.select().from(auditEvents).where(eq(auditEvents.summary, marker));
    expect(row).toBeDefined();

    expect(await rejection(database.update(auditEvents).set({ summary: "rewritten" }).where(eq(auditEvents.id, row.id)))).toBe(
      "audit_events is append-only: UPDATE is not allowed",
    );
    expect(await rejection(database.delete(auditEvents).where(eq(auditEvents.id, row.id)))).toBe(
      "audit_events is append-only: DELETE is not allowed",
    );
    expect(await rejection(database.execute(sql`truncate audit_events`))).toBe("audit_events is append-only: TRUNCATE is not allowed");

    const [after] = await database.select().from(auditEvents).where(eq(auditEvents.id, row.id));
    expect(after.summary).toBe(marker);
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
