import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Role } from "@/db/schema";
import { testDatabase } from "../support/database";
import { demoUser } from "../support/demo-users";
import { BASE_URL, signInOverHttp } from "../support/http-session";

const { pool } = testDatabase();
afterAll(() => pool.end());

/** DESIGN.md's roles table written out: the outbox is for administrators (users:manage) only. */
const MAY_READ: Record<Role, boolean> = { admin: true, director: false, scientist: false, clinician: false };
const ROLES: Role[] = ["admin", "director", "scientist", "clinician"];

const cookies = {} as Record<Role, string>;
const tag = `outbox-api-${Date.now()}`;
let failedId: string;
beforeAll(async () => {
  for (const role of ROLES) cookies[role] = await signInOverHttp(demoUser(role).email, demoUser(role).password);
  // A message that already failed for good: the served app's delivery job leaves it alone.
  const { rows } = await pool.query(
    `INSERT INTO outbox (kind, recipients, subject, text, status, attempts, last_error, created_at)
     VALUES ('version.signed', '["author@lab.example"]', $1, 'The text of the message.', 'failed', 8, '500 internal_server_error: down', now() + interval '1 day')
     RETURNING id`,
    [`Failed message ${tag}`],
  );
  failedId = rows[0].id;
});

function get(path: string, role: Role | null): Promise<Response> {
  return fetch(`${BASE_URL}${path}`, { headers: role ? { cookie: cookies[role] } : {} });
}

async function outboxCount(): Promise<number> {
  return (await pool.query("SELECT count(*)::int AS n FROM outbox")).rows[0].n;
}

describe("GET /api/v1/outbox", () => {
  for (const role of ROLES) {
    it(`${MAY_READ[role] ? "lists" : "refuses"} the outbox for the ${role}`, async () => {
      const before = await outboxCount();
      const res = await get("/api/v1/outbox?pageSize=5", role);
      if (MAY_READ[role]) {
        expect(res.status).toBe(200);
        const body = await res.json();
        expect(body).toMatchObject({ page: 1, pageSize: 5, total: expect.any(Number) });
        expect(body.total).toBeGreaterThanOrEqual(1);
        // Newest first: the failed message above is dated a day ahead.
        expect(body.items[0]).toEqual({
          id: failedId,
          kind: "version.signed",
          recipients: ["author@lab.example"],
          subject: `Failed message ${tag}`,
          text: "The text of the message.",
          status: "failed",
          attempts: 8,
          lastError: "500 internal_server_error: down",
          createdAt: expect.stringMatching(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}Z$/),
          sentAt: null,
        });
      } else {
        expect(res.status).toBe(403);
        expect(res.headers.get("content-type")).toBe("application/problem+json");
        expect((await res.json()).detail).toBe(`Your role (${role}) may not do this.`);
      }
      expect(await outboxCount()).toBe(before);
    });
  }

  it("answers an anonymous caller 401", async () => {
    expect((await get("/api/v1/outbox", null)).status).toBe(401);
  });

  it("pages newest first", async () => {
    const first = await (await get("/api/v1/outbox?page=1&pageSize=1", "admin")).json();
    const second = await (await get("/api/v1/outbox?page=2&pageSize=1", "admin")).json();
    expect(first.items).toHaveLength(1);
    if (first.total > 1) {
      expect(second.items).toHaveLength(1);
      expect(second.items[0].createdAt <= first.items[0].createdAt).toBe(true);
    }
  });

  const invalid: [string, string][] = [
    ["pageSize=0", "pageSize is a whole number from 1 to 200."],
    ["pageSize=201", "pageSize is a whole number from 1 to 200."],
    ["page=0", "page is a whole number from 1."],
    ["status=sent", 'Unrecognized key: "status"'],
  ];
  for (const [query, message] of invalid) {
    it(`answers 422 for ${query}, saying so`, async () => {
      const res = await get(`/api/v1/outbox?${query}`, "admin");
      expect(res.status).toBe(422);
      expect((await res.json()).detail).toContain(message);
    });
  }
});
