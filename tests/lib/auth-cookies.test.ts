import { describe, expect, it } from "vitest";
import { servedOverHttps, sessionCookieName, sessionCookies } from "@/lib/auth/cookies";

/**
 * What the issue asks of session cookies: httpOnly, SameSite, Secure when served over HTTPS (the
 * `__Secure-` and `__Host-` prefixes are RFC 6265bis's: a browser keeps them only from a secure
 * origin). The cookies the served app really sets are checked in tests/api/security-cookies.test.ts.
 */
describe("session cookies", () => {
  it("are Secure with prefixed names when NEXTAUTH_URL is https", () => {
    expect(servedOverHttps("https://bellwether.hospital.example")).toBe(true);
    const options = { httpOnly: true, sameSite: "lax", path: "/", secure: true };
    expect(sessionCookies(true)).toEqual({
      sessionToken: { name: "__Secure-next-auth.session-token", options },
      callbackUrl: { name: "__Secure-next-auth.callback-url", options },
      csrfToken: { name: "__Host-next-auth.csrf-token", options },
    });
    expect(sessionCookieName(true)).toBe("__Secure-next-auth.session-token");
  });

  it("are httpOnly and SameSite but not Secure over plain http", () => {
    for (const url of ["http://127.0.0.1:3000", undefined]) expect(servedOverHttps(url)).toBe(false);
    const options = { httpOnly: true, sameSite: "lax", path: "/", secure: false };
    expect(sessionCookies(false)).toEqual({
      sessionToken: { name: "next-auth.session-token", options },
      callbackUrl: { name: "next-auth.callback-url", options },
      csrfToken: { name: "next-auth.csrf-token", options },
    });
    expect(sessionCookieName(false)).toBe("next-auth.session-token");
  });
});
