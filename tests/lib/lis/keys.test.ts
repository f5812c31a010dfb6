import { execFileSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { bearerTokenOf, describeLisKey, generateLisKey, isWellFormedLisKey, sha256OfLisKey } from "@/lib/lis/keys";

describe("LIS keys", () => {
  it('are "bwk_" and 43 base64url characters, different every time', () => {
    const seen = new Set<string>();
    for (let i = 0; i < 200; i++) {
      const { key, keyPrefix, keySha256 } = generateLisKey();
      // The contract: "bwk_" + 43 base64url chars (32 random bytes).
      expect(key).toMatch(/^bwk_[A-Za-z0-9_-]{43}$/);
      expect(Buffer.from(key.slice(4), "base64url")).toHaveLength(32);
      expect(keyPrefix).toBe(key.slice(0, 12));
      expect(keySha256).toMatch(/^[0-9a-f]{64}$/);
      seen.add(key);
    }
    expect(seen.size).toBe(200);
  });

  it("are stored as the SHA-256 of the whole key, as sha256sum computes it", () => {
    const key = "bwk_test-only-demo-lis-key-for-bellwether-tests";
    // printf %s 'bwk_test-only-demo-lis-key-for-bellwether-tests' | sha256sum
    const expected = execFileSync("sha256sum", { input: key }).toString().split(" ")[0];
    expect(sha256OfLisKey(key)).toBe(expected);
    expect(describeLisKey(key)).toEqual({ key, keyPrefix: "bwk_test-onl", keySha256: expected });
  });

  it("refuse anything else as a key", () => {
    for (const bad of ["", "bwk_", "bwk_short", `bwk_${"a".repeat(42)}`, `bwk_${"a".repeat(44)}`, `xyz_${"a".repeat(43)}`, `bwk_${"a".repeat(42)}=`, `bwk_${"a".repeat(42)}+`]) {
      expect(isWellFormedLisKey(bad)).toBe(false);
    }
    expect(() => describeLisKey("bwk_short")).toThrow('An LIS key is "bwk_" followed by 43 base64url characters.');
  });

  it("are read from a Bearer Authorization header only", () => {
    expect(bearerTokenOf(null)).toBeNull();
    expect(bearerTokenOf("Basic dXNlcjpwYXNz")).toBeNull();
    expect(bearerTokenOf("Bearer bwk_abc")).toBe("bwk_abc");
    expect(bearerTokenOf("bearer   bwk_abc  ")).toBe("bwk_abc");
    expect(bearerTokenOf("Bearer")).toBe("");
    expect(bearerTokenOf("Bearerbwk_abc")).toBeNull();
  });
});
