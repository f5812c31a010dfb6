/**
 * Where to go after signing in: only a path on this site, never another origin. Anything that
 * is not plainly such a path lands on the overview.
 *
 * Browsers and URL parsers are generous in ways that turn a path into another host: `//host`
 * and `/\host` are protocol-relative, tabs and newlines are dropped (`/\t/host` becomes
 * `//host`), a value decoded once more somewhere (`/%2F%2Fhost`) becomes `//host`, and dot
 * segments collapse (`/.//host`). So the value is checked as it is, after every further round of
 * percent-decoding, and once more as the parsed path that is returned.
 */
export const OVERVIEW_PATH = "/";

const PROBE_ORIGIN = "http://bellwether.invalid";
const MAX_DECODING_ROUNDS = 5;

function isPlainSitePath(value: string): boolean {
  if (!value.startsWith("/")) return false;
  if (value.startsWith("//")) return false;
  // A backslash is a slash to browsers; control characters (tab, newline, ...) are dropped by them.
  if (/[\\\u0000-\u001f\u007f]/.test(value)) return false;
  try {
    return new URL(value, PROBE_ORIGIN).origin === PROBE_ORIGIN;
  } catch {
    return false;
  }
}

/** The path to follow after sign-in: the value itself when it is a same-site path, else "/". */
export function safeCallbackPath(raw: unknown): string {
  const value = Array.isArray(raw) ? raw[0] : raw;
  if (typeof value !== "string" || value === "") return OVERVIEW_PATH;
  let layer = value;
  for (let round = 0; round <= MAX_DECODING_ROUNDS; round++) {
    if (!isPlainSitePath(layer)) return OVERVIEW_PATH;
    let decoded: string;
    try {
      decoded = decodeURIComponent(layer);
    } catch {
      return OVERVIEW_PATH;
    }
    if (decoded === layer) {
      // Dot segments collapse on parsing ("/.//host" is "//host"), so the result is checked too.
      const url = new URL(value, PROBE_ORIGIN);
      const path = `${url.pathname}${url.search}${url.hash}`;
      return isPlainSitePath(path) ? path : OVERVIEW_PATH;
    }
    layer = decoded;
  }
  // Still changing after this many rounds: nobody writes a callback like that by accident.
  return OVERVIEW_PATH;
}

/**
 * next-auth's `redirect` callback: the URL it is asked to follow (absolute on this site, or a
 * path) becomes this site's origin plus a safe path.
 */
export function safeRedirectUrl({ url, baseUrl }: { url: string; baseUrl: string }): string {
  const origin = new URL(baseUrl).origin;
  const path = url === origin ? OVERVIEW_PATH : url.startsWith(`${origin}/`) ? url.slice(origin.length) : url;
  return `${origin}${safeCallbackPath(path)}`;
}
