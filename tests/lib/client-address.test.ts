import { describe, expect, it } from "vitest";
import {
  clientAddressOf,
  formatIp,
  parseIp,
  parseTrustedProxies,
  resolveClientAddress,
  throttleBucketOf,
} from "@/lib/api/client-address";

// Addresses from the documentation ranges (RFC 5737: 192.0.2.0/24, 198.51.100.0/24,
// 203.0.113.0/24; RFC 3849: 2001:db8::/32), so no test names a real host.
const canonical = (text: string) => {
  const bytes = parseIp(text);
  return bytes ? formatIp(bytes) : null;
};

describe("parsing and writing addresses", () => {
  it("reads IPv4 in dotted decimal only", () => {
    expect(canonical("192.0.2.7")).toBe("192.0.2.7");
    expect(canonical(" 192.0.2.7 ")).toBe("192.0.2.7");
    for (const bad of ["192.0.2", "192.0.2.256", "192.0.2.07", "192.0.2.7.1", "0x7f.0.0.1", "", "unknown", "192.0.2.-1"]) {
      expect(canonical(bad), bad).toBeNull();
    }
  });

  it("writes IPv6 as RFC 5952 section 4 says", () => {
    // RFC 5952 §4.1 (no leading zeros), §4.2.1 (longest run), §4.2.2 (not one group), §4.2.3 (first of equal runs), §4.3 (lower case).
    expect(canonical("2001:0db8:0000:0000:0000:0000:0000:0001")).toBe("2001:db8::1");
    expect(canonical("2001:db8:0:1:1:1:1:1")).toBe("2001:db8:0:1:1:1:1:1");
    expect(canonical("2001:0:0:1:0:0:0:1")).toBe("2001:0:0:1::1");
    expect(canonical("2001:db8:0:0:1:0:0:1")).toBe("2001:db8::1:0:0:1");
    expect(canonical("2001:DB8::ABCD")).toBe("2001:db8::abcd");
    expect(canonical("::")).toBe("::");
    expect(canonical("::1")).toBe("::1");
    expect(canonical("fe80::1%eth0")).toBe("fe80::1");
  });

  it("turns IPv4-mapped IPv6 into the IPv4 address", () => {
    expect(canonical("::ffff:192.0.2.7")).toBe("192.0.2.7");
    expect(canonical("::FFFF:c000:0207")).toBe("192.0.2.7");
    expect(canonical("0:0:0:0:0:ffff:192.0.2.7")).toBe("192.0.2.7");
  });

  it("refuses malformed IPv6", () => {
    for (const bad of ["2001:db8:::1", "2001:db8::1::2", "1:2:3:4:5:6:7:8:9", "2001:db8::g", ":1", "1:", "12345::", "1.2.3.4::", "::ffff:192.0.2.256"]) {
      expect(canonical(bad), bad).toBeNull();
    }
  });
});

describe("BELLWETHER_TRUSTED_PROXIES", () => {
  it("accepts addresses and CIDR ranges, and names a bad entry", () => {
    expect(parseTrustedProxies(undefined)).toEqual([]);
    expect(parseTrustedProxies(" ")).toEqual([]);
    expect(parseTrustedProxies("127.0.0.1, 10.0.0.0/8,2001:db8::/32").map((r) => r.prefix)).toEqual([32, 8, 32]);
    expect(() => parseTrustedProxies("127.0.0.1,10.0.0.0/33")).toThrow('"10.0.0.0/33" is not an IP address or CIDR range');
    expect(() => parseTrustedProxies("proxy.internal")).toThrow('"proxy.internal" is not an IP address or CIDR range');
  });
});

describe("resolving the client address", () => {
  const none = parseTrustedProxies("");
  const local = parseTrustedProxies("127.0.0.1");

  it("takes the socket's address and ignores forwarding headers when no proxy is trusted", () => {
    expect(resolveClientAddress({ socketAddress: "198.51.100.20", forwardedFor: "203.0.113.9", trustedProxies: none })).toBe("198.51.100.20");
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "203.0.113.9", trustedProxies: none })).toBe("127.0.0.1");
  });

  it("ignores the header from a socket that is not a trusted proxy", () => {
    expect(resolveClientAddress({ socketAddress: "198.51.100.20", forwardedFor: "203.0.113.9", trustedProxies: local })).toBe("198.51.100.20");
  });

  it("believes the right-most entry a trusted proxy appended, not what the client wrote to its left", () => {
    // The client sent "X-Forwarded-For: 192.0.2.66" itself; the proxy appended the real peer.
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "192.0.2.66, 203.0.113.9", trustedProxies: local })).toBe("203.0.113.9");
  });

  it("walks a chain of trusted proxies from the right", () => {
    const chain = parseTrustedProxies("10.0.0.0/8,127.0.0.1");
    expect(
      resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "192.0.2.66, 203.0.113.9, 10.1.2.3, 10.4.5.6", trustedProxies: chain }),
    ).toBe("203.0.113.9");
    // Repeated headers arrive as a list.
    expect(
      resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: ["192.0.2.66", "203.0.113.9, 10.1.2.3"], trustedProxies: chain }),
    ).toBe("203.0.113.9");
  });

  it("uses the socket when the header is absent, and the furthest proxy when every hop is trusted", () => {
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: undefined, trustedProxies: local })).toBe("127.0.0.1");
    const chain = parseTrustedProxies("10.0.0.0/8,127.0.0.1");
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "10.9.9.9, 10.1.1.1", trustedProxies: chain })).toBe("10.9.9.9");
  });

  it("handles IPv6 and IPv4-mapped sockets and entries", () => {
    expect(resolveClientAddress({ socketAddress: "::ffff:127.0.0.1", forwardedFor: "2001:DB8::0:42", trustedProxies: local })).toBe("2001:db8::42");
    expect(resolveClientAddress({ socketAddress: "::ffff:198.51.100.20", forwardedFor: "203.0.113.9", trustedProxies: none })).toBe("198.51.100.20");
    const v6 = parseTrustedProxies("2001:db8:ffff::/48");
    expect(resolveClientAddress({ socketAddress: "2001:db8:ffff::1", forwardedFor: "[2001:db8:1::5]:4711", trustedProxies: v6 })).toBe("2001:db8:1::5");
    expect(resolveClientAddress({ socketAddress: "2001:db8:ffff::1", forwardedFor: "::ffff:203.0.113.9", trustedProxies: v6 })).toBe("203.0.113.9");
  });

  it("reads entries with ports", () => {
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "203.0.113.9:50123", trustedProxies: local })).toBe("203.0.113.9");
  });

  it("stops at a malformed entry and keeps the nearest real hop, so garbage cannot pick the bucket", () => {
    const chain = parseTrustedProxies("10.0.0.0/8,127.0.0.1");
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "unknown", trustedProxies: local })).toBe("127.0.0.1");
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "203.0.113.9, garbage, 10.1.2.3", trustedProxies: chain })).toBe("10.1.2.3");
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "203.0.113.9, 999.1.1.1", trustedProxies: local })).toBe("127.0.0.1");
    // Malformed entries left of the client are never reached.
    expect(resolveClientAddress({ socketAddress: "127.0.0.1", forwardedFor: "not an address, 203.0.113.9", trustedProxies: local })).toBe("203.0.113.9");
  });

  it("gives an unknown socket the unknown bucket", () => {
    expect(resolveClientAddress({ socketAddress: undefined, forwardedFor: "203.0.113.9", trustedProxies: local })).toBe("unknown");
  });
});

describe("reading the resolved address in the app", () => {
  it("reads the header, and falls back to one unknown bucket", () => {
    expect(clientAddressOf(new Headers({ "x-bellwether-client-address": "203.0.113.9" }))).toBe("203.0.113.9");
    expect(clientAddressOf({ "x-bellwether-client-address": "2001:0db8::0001" })).toBe("2001:db8::1");
    expect(clientAddressOf(new Headers())).toBe("unknown");
    expect(clientAddressOf({ "x-bellwether-client-address": "203.0.113.9, 192.0.2.1" })).toBe("unknown");
  });

  it("counts IPv6 clients by their /64 network and IPv4 clients by address", () => {
    expect(throttleBucketOf("2001:db8:1:2:aaaa::1")).toBe("2001:db8:1:2::/64");
    expect(throttleBucketOf("2001:db8:1:2:bbbb::9")).toBe("2001:db8:1:2::/64");
    expect(throttleBucketOf("203.0.113.9")).toBe("203.0.113.9");
    expect(throttleBucketOf("unknown")).toBe("unknown");
  });
});
