import { describe, expect, it } from "vitest";
import { crossSiteRefusal } from "@/lib/api/origin";

const APP = "https://bellwether.hospital.example";
const BY_ORIGIN = (origin: string) =>
  `Bellwether refused this change because it came from another site (${origin}). Changes made with a signed-in session must come from Bellwether's own pages; a laboratory system sends its LIS key instead.`;
const BY_FETCH_SITE = (site: string) =>
  `Bellwether refused this change because the browser marked it as coming from another site (Sec-Fetch-Site: ${site}). Changes made with a signed-in session must come from Bellwether's own pages; a laboratory system sends its LIS key instead.`;

/**
 * The rule (common practice for cookie sessions, as the OWASP CSRF cheat sheet describes it):
 * `Origin` must be the app's own; without `Origin`, `Sec-Fetch-Site` must not name another site.
 */
const cases: [string, Record<string, string>, string | null][] = [
  ["the configured origin", { origin: APP, host: "127.0.0.1:3000" }, null],
  ["the host the request was sent to (behind no proxy)", { origin: "http://127.0.0.1:3000", host: "127.0.0.1:3000" }, null],
  ["the host named in upper case", { origin: "http://LOCALHOST:3000", host: "localhost:3000" }, null],
  ["another site", { origin: "https://evil.example", host: "bellwether.hospital.example" }, BY_ORIGIN("https://evil.example")],
  ["a sibling host of the same site", { origin: "https://wiki.hospital.example", host: "bellwether.hospital.example" }, BY_ORIGIN("https://wiki.hospital.example")],
  ["the app's host on another port", { origin: "https://bellwether.hospital.example:8443", host: "127.0.0.1:3000" }, BY_ORIGIN("https://bellwether.hospital.example:8443")],
  ["the app's host over plain http when it is served over https", { origin: "http://bellwether.hospital.example", host: "127.0.0.1:3000" }, BY_ORIGIN("http://bellwether.hospital.example")],
  ["Origin: null (a sandboxed frame, a data: page)", { origin: "null", host: "127.0.0.1:3000" }, BY_ORIGIN("null")],
  ["an origin that is not a URL", { origin: "not a url", host: "127.0.0.1:3000" }, BY_ORIGIN("not a url")],
  ["a file: origin", { origin: "file://", host: "127.0.0.1:3000" }, BY_ORIGIN("file://")],
  ["no Origin, Sec-Fetch-Site cross-site", { "sec-fetch-site": "cross-site" }, BY_FETCH_SITE("cross-site")],
  ["no Origin, Sec-Fetch-Site same-site", { "sec-fetch-site": "same-site" }, BY_FETCH_SITE("same-site")],
  ["no Origin, Sec-Fetch-Site same-origin", { "sec-fetch-site": "same-origin" }, null],
  ["no Origin, Sec-Fetch-Site none (typed by the user)", { "sec-fetch-site": "none" }, null],
  ["neither header (a script, not a browser)", {}, null],
  ["a foreign Origin even with Sec-Fetch-Site same-origin", { origin: "https://evil.example", "sec-fetch-site": "same-origin" }, BY_ORIGIN("https://evil.example")],
];

describe("crossSiteRefusal", () => {
  for (const [what, headers, expected] of cases) {
    it(`${expected === null ? "lets through" : "refuses"} ${what}`, () => {
      expect(crossSiteRefusal(new Headers(headers), APP)).toBe(expected);
    });
  }

  it("compares with the Host header alone when no origin is configured", () => {
    expect(crossSiteRefusal(new Headers({ origin: "http://127.0.0.1:3000", host: "127.0.0.1:3000" }), null)).toBeNull();
    expect(crossSiteRefusal(new Headers({ origin: APP, host: "127.0.0.1:3000" }), null)).toBe(BY_ORIGIN(APP));
  });

  it("shortens a very long Origin in its message", () => {
    const long = `https://${"a".repeat(300)}.example`;
    expect(crossSiteRefusal(new Headers({ origin: long }), APP)).toBe(BY_ORIGIN(`${long.slice(0, 100)}…`));
  });
});
