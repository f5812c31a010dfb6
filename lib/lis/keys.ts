import { createHash, randomBytes } from "node:crypto";
import { LIS_KEY_PATTERN, LIS_KEY_PREFIX } from "./key-format";

/**
 * LIS connection keys: "bwk_" and 43 base64url characters (32 random bytes, 256 bits). Only the
 * SHA-256 of the whole key is stored, with its first 12 characters for recognition. A slow
 * password hash is not needed for a random key this long, and would cost every request.
 */
export { LIS_KEY_PATTERN, LIS_KEY_PREFIX };
/** How many characters of a key are kept and shown beside its connection's name. */
export const LIS_KEY_PREFIX_LENGTH = 12;

export interface IssuedKey {
  /** The key itself: shown once, stored nowhere. */
  key: string;
  keyPrefix: string;
  keySha256: string;
}

export function isWellFormedLisKey(text: string): boolean {
  return LIS_KEY_PATTERN.test(text);
}

/** Lower-case hex SHA-256 of the key's UTF-8 bytes. */
export function sha256OfLisKey(key: string): string {
  return createHash("sha256").update(key, "utf8").digest("hex");
}

export function prefixOfLisKey(key: string): string {
  return key.slice(0, LIS_KEY_PREFIX_LENGTH);
}

/** The stored form of a key (prefix and hash), for a key given from outside (the demo's). */
export function describeLisKey(key: string): IssuedKey {
  if (!isWellFormedLisKey(key)) throw new Error('An LIS key is "bwk_" followed by 43 base64url characters.');
  return { key, keyPrefix: prefixOfLisKey(key), keySha256: sha256OfLisKey(key) };
}

/** A new random key with its stored form. */
export function generateLisKey(): IssuedKey {
  return describeLisKey(LIS_KEY_PREFIX + randomBytes(32).toString("base64url"));
}

/**
 * The key from an `Authorization` header: the text after "Bearer " (case-insensitive scheme),
 * or null when the header is absent or another scheme. A Bearer header with an empty token gives "".
 */
export function bearerTokenOf(header: string | null): string | null {
  if (!header) return null;
  const match = /^\s*bearer(?:\s+(.*))?$/i.exec(header);
  if (!match) return null;
  return (match[1] ?? "").trim();
}
