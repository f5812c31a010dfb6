/**
 * Who is on the other end of a request, for throttling sign-ins. The custom server
 * (scripts/serve.ts) resolves the address from the socket, believing `X-Forwarded-For` only from
 * the proxies named in BELLWETHER_TRUSTED_PROXIES, and hands it to the app in one header that it
 * always overwrites. The app reads that header through `clientAddressOf` and nothing else.
 * Pure: no Node APIs, so both the server script and the app import it.
 */

/** The header the custom server sets; anything a client sends under this name is discarded. */
export const CLIENT_ADDRESS_HEADER = "x-bellwether-client-address";

/** The bucket for requests whose address is not known (the app served without scripts/serve.ts). */
export const UNKNOWN_CLIENT_ADDRESS = "unknown";

/** An address as bytes: 4 for IPv4, 16 for IPv6. IPv4-mapped IPv6 addresses become IPv4. */
export type IpBytes = Uint8Array;

function parseIpv4(text: string): IpBytes | null {
  const parts = text.split(".");
  if (parts.length !== 4) return null;
  const bytes = new Uint8Array(4);
  for (let i = 0; i < 4; i++) {
    // Decimal only, no leading zeros: "010" is octal to some parsers and decimal to others.
    if (!/^(0|[1-9]\d{0,2})$/.test(parts[i])) return null;
    const n = Number(parts[i]);
    if (n > 255) return null;
    bytes[i] = n;
  }
  return bytes;
}

function parseIpv6(text: string): IpBytes | null {
  if (!/^[0-9a-fA-F:.]+$/.test(text)) return null;
  const halves = text.split("::");
  if (halves.length > 2) return null;
  const groupsOf = (part: string): number[] | null => {
    if (part === "") return [];
    const out: number[] = [];
    const pieces = part.split(":");
    for (let i = 0; i < pieces.length; i++) {
      const piece = pieces[i];
      if (i === pieces.length - 1 && piece.includes(".")) {
        const v4 = parseIpv4(piece);
        if (!v4) return null;
        out.push((v4[0] << 8) | v4[1], (v4[2] << 8) | v4[3]);
      } else {
        if (!/^[0-9a-fA-F]{1,4}$/.test(piece)) return null;
        out.push(parseInt(piece, 16));
      }
    }
    return out;
  };
  const head = groupsOf(halves[0]);
  const tail = halves.length === 2 ? groupsOf(halves[1]) : [];
  if (!head || !tail) return null;
  // An embedded IPv4 address may only end the address.
  if (halves.length === 2 && halves[0].includes(".")) return null;
  let groups: number[];
  if (halves.length === 2) {
    const missing = 8 - head.length - tail.length;
    if (missing < 1) return null;
    groups = [...head, ...new Array<number>(missing).fill(0), ...tail];
  } else {
    groups = head;
  }
  if (groups.length !== 8) return null;
  const bytes = new Uint8Array(16);
  groups.forEach((g, i) => {
    bytes[2 * i] = g >> 8;
    bytes[2 * i + 1] = g & 0xff;
  });
  return bytes;
}

function isIpv4Mapped(bytes: IpBytes): boolean {
  return bytes.length === 16 && bytes.slice(0, 10).every((b) => b === 0) && bytes[10] === 0xff && bytes[11] === 0xff;
}

/**
 * Parses an IPv4 or IPv6 address (an IPv6 zone such as `%eth0` is dropped); IPv4-mapped IPv6
 * (`::ffff:192.0.2.1`) becomes the IPv4 address. Returns null for anything else.
 */
export function parseIp(text: string): IpBytes | null {
  const trimmed = text.trim();
  if (trimmed === "") return null;
  const bytes = trimmed.includes(":") ? parseIpv6(trimmed.replace(/%[0-9A-Za-z_.-]+$/, "")) : parseIpv4(trimmed);
  if (!bytes) return null;
  return isIpv4Mapped(bytes) ? bytes.slice(12) : bytes;
}

/** The canonical text of an address: dotted IPv4, or IPv6 in RFC 5952's compressed lower case. */
export function formatIp(bytes: IpBytes): string {
  if (bytes.length === 4) return Array.from(bytes).join(".");
  const groups = Array.from({ length: 8 }, (_, i) => (bytes[2 * i] << 8) | bytes[2 * i + 1]);
  // The longest run of two or more zero groups (the first, on a tie) becomes "::".
  let bestStart = -1;
  let bestLength = 1;
  for (let i = 0; i < 8; ) {
    if (groups[i] !== 0) {
      i++;
      continue;
    }
    let j = i;
    while (j < 8 && groups[j] === 0) j++;
    if (j - i > bestLength) {
      bestStart = i;
      bestLength = j - i;
    }
    i = j;
  }
  const hex = groups.map((g) => g.toString(16));
  if (bestStart < 0) return hex.join(":");
  return `${hex.slice(0, bestStart).join(":")}::${hex.slice(bestStart + bestLength).join(":")}`;
}

/** A network: an address and a prefix length in bits. */
export interface IpRange {
  bytes: IpBytes;
  prefix: number;
}

/** Parses `192.0.2.1`, `10.0.0.0/8`, `2001:db8::/32`; null when malformed. */
export function parseIpRange(text: string): IpRange | null {
  const [addressText, prefixText, extra] = text.trim().split("/");
  if (extra !== undefined) return null;
  const bytes = parseIp(addressText);
  if (!bytes) return null;
  const bits = bytes.length * 8;
  if (prefixText === undefined) return { bytes, prefix: bits };
  if (!/^\d{1,3}$/.test(prefixText)) return null;
  let prefix = Number(prefixText);
  // An IPv4-mapped IPv6 range (::ffff:10.0.0.0/104) is the IPv4 range /8.
  if (bytes.length === 4 && addressText.includes(":")) prefix -= 96;
  if (prefix < 0 || prefix > bits) return null;
  return { bytes, prefix };
}

/**
 * Parses BELLWETHER_TRUSTED_PROXIES: comma-separated addresses or CIDR ranges. Throws an Error
 * naming the first entry that is neither (lib/env.ts turns it into a start-up message).
 */
export function parseTrustedProxies(text: string | undefined): IpRange[] {
  if (!text || text.trim() === "") return [];
  return text.split(",").map((entry) => {
    const range = parseIpRange(entry);
    if (!range) throw new Error(`"${entry.trim()}" is not an IP address or CIDR range`);
    return range;
  });
}

export function inRange(bytes: IpBytes, range: IpRange): boolean {
  if (bytes.length !== range.bytes.length) return false;
  const full = Math.floor(range.prefix / 8);
  for (let i = 0; i < full; i++) if (bytes[i] !== range.bytes[i]) return false;
  const rest = range.prefix % 8;
  if (rest === 0) return true;
  const mask = (0xff << (8 - rest)) & 0xff;
  return (bytes[full] & mask) === (range.bytes[full] & mask);
}

function isTrusted(bytes: IpBytes, trusted: readonly IpRange[]): boolean {
  return trusted.some((range) => inRange(bytes, range));
}

/**
 * One `X-Forwarded-For` entry as an address. Proxies differ: some add a port (`192.0.2.1:4711`,
 * `[2001:db8::1]:443`), some quote. Returns null for anything that is not an address.
 */
function parseForwardedEntry(entry: string): IpBytes | null {
  let text = entry.trim().replace(/^"(.*)"$/, "$1");
  const bracketed = /^\[([^\]]+)\](?::\d{1,5})?$/.exec(text);
  if (bracketed) text = bracketed[1];
  else if (/^[\d.]+:\d{1,5}$/.test(text)) text = text.slice(0, text.lastIndexOf(":"));
  return parseIp(text);
}

/**
 * The client's address for one request.
 *
 * Without trusted proxies, the socket's address, whatever the headers say. When the socket's
 * address is a trusted proxy, `X-Forwarded-For` is read from the right (each proxy appends the
 * address it received the request from): trusted proxies are skipped and the first address that is
 * not one is the client. Entries left of it were written by whoever the client is, and are never
 * believed. A malformed entry met before the client stops the walk: the nearest hop known to be
 * real (the last trusted proxy) is used instead, so that garbage cannot choose the bucket.
 * When every hop is trusted, the furthest one is the client (a request from inside).
 */
export function resolveClientAddress({
  socketAddress,
  forwardedFor,
  trustedProxies,
}: {
  socketAddress: string | undefined;
  forwardedFor: string | readonly string[] | undefined;
  trustedProxies: readonly IpRange[];
}): string {
  const socket = socketAddress ? parseIp(socketAddress) : null;
  if (!socket) return UNKNOWN_CLIENT_ADDRESS;
  if (!isTrusted(socket, trustedProxies)) return formatIp(socket);
  const header = Array.isArray(forwardedFor) ? forwardedFor.join(",") : ((forwardedFor as string | undefined) ?? "");
  const entries = header.split(",").filter((e) => e.trim() !== "");
  let nearest = socket;
  for (let i = entries.length - 1; i >= 0; i--) {
    const hop = parseForwardedEntry(entries[i]);
    if (!hop) break;
    if (!isTrusted(hop, trustedProxies)) return formatIp(hop);
    nearest = hop;
  }
  return formatIp(nearest);
}

/**
 * The client address the custom server resolved, read from the request's headers; requests that
 * did not pass through it (or carry a value that is not an address) share one "unknown" bucket.
 */
export function clientAddressOf(headers: Headers | Record<string, string | string[] | undefined>): string {
  const raw = headers instanceof Headers ? headers.get(CLIENT_ADDRESS_HEADER) : headers[CLIENT_ADDRESS_HEADER];
  const value = Array.isArray(raw) ? raw[0] : raw;
  const bytes = value ? parseIp(value) : null;
  return bytes ? formatIp(bytes) : UNKNOWN_CLIENT_ADDRESS;
}

/**
 * The bucket sign-in throttling counts under: an IPv4 address as it is, an IPv6 address by its
 * /64 network, since one subscriber usually holds a whole /64 and could otherwise take a fresh
 * address for every attempt.
 */
export function throttleBucketOf(address: string): string {
  const bytes = parseIp(address);
  if (!bytes) return UNKNOWN_CLIENT_ADDRESS;
  if (bytes.length === 4) return formatIp(bytes);
  const network = new Uint8Array(16);
  network.set(bytes.slice(0, 8));
  return `${formatIp(network)}/64`;
}
