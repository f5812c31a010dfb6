/** Sign-in attempts as clients at chosen addresses (see attemptSignIn in ./http-session). */
export { attemptSignIn, type AttemptResult } from "./http-session";

const octet = () => Math.floor(Math.random() * 254) + 1;

/**
 * A client address no other test uses: random in the private range 10.0.0.0/8 (never routed,
 * and 16 million of them, so test files do not meet by chance).
 */
export function freshAddress(): string {
  return `10.${octet()}.${octet()}.${octet()}`;
}

/** A fresh IPv6 client in the documentation range 2001:db8::/32 (RFC 3849), in its own /64. */
export function freshIpv6Network(): string {
  const group = () => (Math.floor(Math.random() * 0xfffe) + 1).toString(16);
  return `2001:db8:${group()}:${group()}`;
}
