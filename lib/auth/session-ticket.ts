import { createHmac, timingSafeEqual } from "node:crypto";

/**
 * After a person changes their own password, every session signed in before ends (the user's
 * session version goes up), including, by itself, the one they changed it in. That session is
 * kept by a ticket: the server action hands it back to the browser, which passes it to next-auth's
 * session update; the jwt callback accepts the new version only when the ticket verifies.
 *
 * A ticket names the user, the new session version and the session it was issued to (the `sid`
 * made at sign-in), expires after a minute, and is signed with HMAC-SHA256 under NEXTAUTH_SECRET.
 * Another stale session of the same user cannot use it (another sid), nor can anyone make one
 * without the secret.
 */
export const SESSION_TICKET_SECONDS = 60;

const PURPOSE = "bellwether-session-ticket-v1";

interface TicketClaims {
  userId: string;
  sessionId: string;
  version: number;
  expiresAt: number;
}

function sign(payload: string, secret: string): string {
  return createHmac("sha256", secret).update(`${PURPOSE}.${payload}`).digest("base64url");
}

export function issueSessionTicket(
  { userId, sessionId, version }: { userId: string; sessionId: string; version: number },
  { secret, now = new Date() }: { secret: string; now?: Date },
): string {
  const claims: TicketClaims = { userId, sessionId, version, expiresAt: now.getTime() + SESSION_TICKET_SECONDS * 1000 };
  const payload = Buffer.from(JSON.stringify(claims)).toString("base64url");
  return `${payload}.${sign(payload, secret)}`;
}

/**
 * The session version a ticket grants to this user's session, or null when it is forged,
 * expired, or issued to another user or session.
 */
export function verifySessionTicket(
  ticket: unknown,
  { userId, sessionId, secret, now = new Date() }: { userId: string; sessionId: string; secret: string; now?: Date },
): number | null {
  if (typeof ticket !== "string" || ticket.length > 1024) return null;
  const [payload, signature, extra] = ticket.split(".");
  if (!payload || !signature || extra !== undefined) return null;
  const expected = Buffer.from(sign(payload, secret));
  const given = Buffer.from(signature);
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) return null;
  let claims: Partial<TicketClaims>;
  try {
    claims = JSON.parse(Buffer.from(payload, "base64url").toString("utf8")) as Partial<TicketClaims>;
  } catch {
    return null;
  }
  if (claims.userId !== userId || claims.sessionId !== sessionId) return null;
  if (typeof claims.expiresAt !== "number" || claims.expiresAt <= now.getTime()) return null;
  if (typeof claims.version !== "number" || !Number.isInteger(claims.version)) return null;
  return claims.version;
}
