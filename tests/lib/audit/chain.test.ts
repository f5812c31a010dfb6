import { execFileSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { chainLinks, ChainWalker, GENESIS_HASH, linkHash, linkText, type ChainedEvent } from "@/lib/audit/chain";

const event = (id: number, summary = `event ${id}`): ChainedEvent => ({
  id: String(id),
  at: "2026-03-01T09:30:00.123456Z",
  actorId: null,
  actorLabel: "system",
  action: "test.marker",
  entityType: "test",
  entityId: null,
  summary,
  details: '{"b": 1, "a": "é"}',
});

/** The hash as coreutils computes it: `printf '%s' "$TEXT" | sha256sum`. */
function sha256sum(text: string): string {
  return execFileSync("sha256sum", { input: Buffer.from(text, "utf8") }).toString().split(" ")[0];
}

describe("the audit chain's link text and hash", () => {
  it("is RFC 8785 text (keys sorted, no whitespace) of format, position, previous hash and the stored event", () => {
    // Written out by hand from RFC 8785 §3.2.3 (property names sorted by UTF-16 code units).
    expect(linkText({ position: 1, prevHash: GENESIS_HASH, event: event(7) })).toBe(
      `{"event":{"action":"test.marker","actorId":null,"actorLabel":"system","at":"2026-03-01T09:30:00.123456Z",` +
        `"details":"{\\"b\\": 1, \\"a\\": \\"é\\"}","entityId":null,"entityType":"test","id":"7","summary":"event 7"},` +
        `"format":"bellwether.audit-chain.v1","position":1,"prevHash":"${"0".repeat(64)}"}`,
    );
  });

  it("hashes to what sha256sum gives for the same text", () => {
    const input = { position: 3, prevHash: "ab".repeat(32), event: event(12, "Signed version 2 of GLU — approved") };
    expect(linkHash(input)).toBe(sha256sum(linkText(input)));
  });

  it("links each event to the one before, starting from 64 zeros or from the head given", () => {
    const links = chainLinks(null, [event(1), event(3), event(2)]);
    expect(links.map((l) => [l.position, l.eventId])).toEqual([[1, "1"], [2, "3"], [3, "2"]]);
    expect(links[0].prevHash).toBe(GENESIS_HASH);
    expect(links[1].prevHash).toBe(links[0].hash);
    expect(links[2].prevHash).toBe(links[1].hash);
    const more = chainLinks({ position: 3, hash: links[2].hash }, [event(4)]);
    expect(more[0]).toMatchObject({ position: 4, prevHash: links[2].hash, eventId: "4" });
  });
});

describe("walking the chain", () => {
  const events = [event(1), event(2), event(3)];
  const links = chainLinks(null, events);

  it("accepts an intact chain and ends at its head", () => {
    const walker = new ChainWalker();
    links.forEach((l, i) => expect(walker.next(l, events[i])).toBeNull());
    expect(walker.head()).toEqual({ position: 3, hash: links[2].hash });
    expect(walker.linksChecked).toBe(3);
  });

  it("names the event whose stored text changed", () => {
    const walker = new ChainWalker();
    expect(walker.next(links[0], events[0])).toBeNull();
    expect(walker.next(links[1], { ...events[1], summary: "rewritten" })).toEqual({
      position: 2,
      eventId: "2",
      reason: "audit event 2 was changed after it was chained (link 2's hash no longer matches it)",
    });
  });

  it("names a missing link, a link that does not follow, and a vanished event", () => {
    const skip = new ChainWalker();
    skip.next(links[0], events[0]);
    expect(skip.next(links[2], events[2])?.reason).toBe("link 2 is missing: the chain jumps from position 1 to 3");

    const rehashed = new ChainWalker();
    rehashed.next(links[0], events[0]);
    expect(rehashed.next({ ...links[1], prevHash: "f".repeat(64) }, events[1])?.reason).toBe("link 2 does not follow link 1: its previous hash differs");

    const gone = new ChainWalker();
    expect(gone.next(links[0], null)?.reason).toBe("audit event 1 of link 1 no longer exists");
  });
});
