/**
 * The form of an LIS key, apart from lib/lis/keys.ts (which needs node:crypto) so that the
 * environment's schema can check BELLWETHER_DEMO_LIS_KEY anywhere: "bwk_" and 43 base64url
 * characters, the encoding of 32 random bytes.
 */
export const LIS_KEY_PREFIX = "bwk_";
export const LIS_KEY_PATTERN = /^bwk_[A-Za-z0-9_-]{43}$/;
