/**
 * The audit trail's hash chain, as anyone can recompute it. Each link binds one audit event to
 * the link before it:
 *
 *   hash = SHA-256( JCS({ format, position, prevHash, event }) )
 *
 * JCS is RFC 8785 (the `canonicalize` package, as for signatures); `event` is the row exactly as
 * stored, every field as PostgreSQL prints it so that nothing is lost to a JavaScript number or
 * Date: `id` as decimal text, `at` in UTC with microseconds (`to_char(at AT TIME ZONE 'UTC',
 * 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"')`), `details` as the jsonb's own text (`details::text`).
 * The first link's `prevHash` is 64 zeros. `printf '%s' "$TEXT" | sha256sum` gives the same hash.
 */
import { createHash } from "node:crypto";
import canonicalize from "canonicalize";

export const AUDIT_CHAIN_FORMAT = "bellwether.audit-chain.v1";
export const GENESIS_HASH = "0".repeat(64);

/** An audit event as the chain reads it (db/audit-chain.ts selects these texts). */
export interface ChainedEvent {
  id: string;
  at: string;
  actorId: string | null;
  actorLabel: string;
  action: string;
  entityType: string;
  entityId: string | null;
  summary: string;
  details: string;
}

export interface ChainLink {
  position: number;
  eventId: string;
  prevHash: string;
  hash: string;
}

/** The newest link: what backups and dossiers carry so that a rewritten chain is caught. */
export interface ChainHead {
  position: number;
  eventId: string;
  hash: string;
}

/** The RFC 8785 text that a link's hash covers. */
export function linkText({ position, prevHash, event }: { position: number; prevHash: string; event: ChainedEvent }): string {
  const text = canonicalize({
    format: AUDIT_CHAIN_FORMAT,
    position,
    prevHash,
    event: {
      id: event.id,
      at: event.at,
      actorId: event.actorId,
      actorLabel: event.actorLabel,
      action: event.action,
      entityType: event.entityType,
      entityId: event.entityId,
      summary: event.summary,
      details: event.details,
    },
  });
  if (text === undefined) throw new Error("an audit event could not be serialised for the chain");
  return text;
}

export function linkHash(input: { position: number; prevHash: string; event: ChainedEvent }): string {
  return createHash("sha256").update(linkText(input), "utf8").digest("hex");
}

/** The links that follow `head` (null: an empty chain) for events in the order given. */
export function chainLinks(head: { position: number; hash: string } | null, events: readonly ChainedEvent[]): ChainLink[] {
  let position = head?.position ?? 0;
  let prevHash = head?.hash ?? GENESIS_HASH;
  return events.map((event) => {
    position += 1;
    const hash = linkHash({ position, prevHash, event });
    const link = { position, eventId: event.id, prevHash, hash };
    prevHash = hash;
    return link;
  });
}

/** Where and why the chain first fails to hold. */
export interface ChainBreak {
  position: number | null;
  eventId: string | null;
  reason: string;
}

/**
 * Walks links in position order, each with its event as stored now (null when the event is
 * gone), carrying the state between batches. Returns the first break, or null.
 */
export class ChainWalker {
  private position = 0;
  private prevHash = GENESIS_HASH;
  linksChecked = 0;

  next(link: ChainLink, event: ChainedEvent | null): ChainBreak | null {
    const at = { position: link.position, eventId: link.eventId };
    if (link.position !== this.position + 1) {
      return { ...at, reason: `link ${this.position + 1} is missing: the chain jumps from position ${this.position} to ${link.position}` };
    }
    if (link.prevHash !== this.prevHash) {
      return { ...at, reason: `link ${link.position} does not follow link ${this.position}: its previous hash differs` };
    }
    if (event === null) return { ...at, reason: `audit event ${link.eventId} of link ${link.position} no longer exists` };
    if (event.id !== link.eventId) return { ...at, reason: `link ${link.position} names event ${link.eventId}, not ${event.id}` };
    if (linkHash({ position: link.position, prevHash: link.prevHash, event }) !== link.hash) {
      return { ...at, reason: `audit event ${link.eventId} was changed after it was chained (link ${link.position}'s hash no longer matches it)` };
    }
    this.position = link.position;
    this.prevHash = link.hash;
    this.linksChecked += 1;
    return null;
  }

  head(): { position: number; hash: string } {
    return { position: this.position, hash: this.prevHash };
  }
}
