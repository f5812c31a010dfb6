import { createHmac } from "node:crypto";
import { describe, expect, it } from "vitest";
import { issueSessionTicket, verifySessionTicket } from "@/lib/auth/session-ticket";

const secret = "s".repeat(40);
const userId = "00000000-0000-4000-8000-000000000001";
const sessionId = "6f1c2c1e-5b1b-4a53-9b2c-1d3f4e5a6b7c";
const issuedAt = new Date("2026-03-02T10:00:00Z");
const ticket = issueSessionTicket({ userId, sessionId, version: 7 }, { secret, now: issuedAt });
const at = (seconds: number) => new Date(issuedAt.getTime() + seconds * 1000);

describe("session tickets", () => {
  it("grant the new version to the session they were issued to, within a minute", () => {
    expect(verifySessionTicket(ticket, { userId, sessionId, secret, now: at(59) })).toBe(7);
  });

  it("expire after 60 seconds (the lifetime the design states)", () => {
    expect(verifySessionTicket(ticket, { userId, sessionId, secret, now: at(60) })).toBeNull();
  });

  it("refuse another user, another session and another secret", () => {
    expect(verifySessionTicket(ticket, { userId: "00000000-0000-4000-8000-000000000002", sessionId, secret, now: at(1) })).toBeNull();
    expect(verifySessionTicket(ticket, { userId, sessionId: "another-session", secret, now: at(1) })).toBeNull();
    expect(verifySessionTicket(ticket, { userId, sessionId, secret: "t".repeat(40), now: at(1) })).toBeNull();
  });

  it("refuse a ticket whose claims were changed, even when re-encoded cleanly", () => {
    const [, signature] = ticket.split(".");
    const raised = Buffer.from(JSON.stringify({ userId, sessionId, version: 8, expiresAt: at(60).getTime() })).toString("base64url");
    expect(verifySessionTicket(`${raised}.${signature}`, { userId, sessionId, secret, now: at(1) })).toBeNull();
  });

  it("refuse a signature made without the purpose prefix (a bare HMAC of the payload)", () => {
    const [payload] = ticket.split(".");
    const bare = createHmac("sha256", secret).update(payload).digest("base64url");
    expect(verifySessionTicket(`${payload}.${bare}`, { userId, sessionId, secret, now: at(1) })).toBeNull();
  });

  it("refuse what is not a ticket", () => {
    for (const bad of [undefined, null, 42, "", "abc", `${ticket}.x`, "x".repeat(2000), { ticket }]) {
      expect(verifySessionTicket(bad, { userId, sessionId, secret, now: at(1) })).toBeNull();
    }
  });
});
