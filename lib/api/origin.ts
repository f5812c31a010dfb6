/**
 * Cross-site request refusal for changes made with the session cookie. A browser attaches the
 * cookie (SameSite=Lax still sends it to a sibling host of the same site, and on top-level
 * navigations) and names where the request came from in `Origin`, or, where an older request
 * type omits `Origin`, in `Sec-Fetch-Site`. Requests carrying an LIS key are not checked here:
 * a page on another site cannot make a browser send `Authorization`.
 */

/** The methods that change state; GET and HEAD change nothing in Bellwether. */
export const STATE_CHANGING_METHODS: ReadonlySet<string> = new Set(["POST", "PUT", "PATCH", "DELETE"]);

/** `Sec-Fetch-Site` values that name another origin than Bellwether's own. */
const FOREIGN_FETCH_SITES: ReadonlySet<string> = new Set(["cross-site", "same-site"]);

const AFTERWORD =
  "Changes made with a signed-in session must come from Bellwether's own pages; a laboratory system sends its LIS key instead.";

/** Keeps an untrusted header short in a message. */
function shown(value: string): string {
  return value.length > 100 ? `${value.slice(0, 100)}…` : value;
}

export function foreignOriginMessage(origin: string): string {
  return `Bellwether refused this change because it came from another site (${shown(origin)}). ${AFTERWORD}`;
}

export function foreignFetchSiteMessage(fetchSite: string): string {
  return `Bellwether refused this change because the browser marked it as coming from another site (Sec-Fetch-Site: ${shown(fetchSite)}). ${AFTERWORD}`;
}

/** The origin (scheme, host, port) of a URL, or null when it is not an http(s) URL. */
export function originOf(url: string | undefined | null): string | null {
  if (!url) return null;
  try {
    const parsed = new URL(url);
    return parsed.protocol === "http:" || parsed.protocol === "https:" ? parsed.origin : null;
  } catch {
    return null;
  }
}

/**
 * Why a state-changing request must be refused as cross-site, or null when it may go on. `Origin`
 * is accepted when it is the app's configured origin (NEXTAUTH_URL) or names the host the request
 * was sent to (`Host`, which a page on another site cannot choose); `Origin: null` and anything
 * else are refused. Without `Origin`, `Sec-Fetch-Site: cross-site` or `same-site` is refused;
 * a request with neither header (a script, not a browser) goes on.
 */
export function crossSiteRefusal(headers: Headers, appOrigin: string | null): string | null {
  const origin = headers.get("origin");
  if (origin !== null) {
    const claimed = originOf(origin);
    if (claimed !== null) {
      if (appOrigin !== null && claimed === appOrigin) return null;
      const host = headers.get("host");
      if (host !== null && new URL(claimed).host === host.toLowerCase()) return null;
    }
    return foreignOriginMessage(origin);
  }
  const fetchSite = headers.get("sec-fetch-site")?.trim().toLowerCase();
  if (fetchSite && FOREIGN_FETCH_SITES.has(fetchSite)) return foreignFetchSiteMessage(fetchSite);
  return null;
}
