import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";
import { crossSiteRefusal, originOf, STATE_CHANGING_METHODS } from "@/lib/api/origin";
import { servedOverHttps, sessionCookieName } from "@/lib/auth/cookies";
import { env } from "@/lib/env";

/**
 * Runs before every page and API request: sets a per-request content security policy (with a
 * nonce for Next's inline scripts), keeps anonymous users out of every page but sign-in, and
 * refuses a cross-site POST to a page (a server action) that carries no `Origin` but is marked
 * cross-site by `Sec-Fetch-Site`: Next checks a server action's `Origin` against `Host` itself
 * and lets a request without `Origin` through. Route handlers check in lib/api/handler.ts.
 * This is only the first gate: every page, route handler and server action checks the caller
 * and the role again on the server.
 */
const PUBLIC_PAGES = ["/sign-in"];

function contentSecurityPolicy(nonce: string): string {
  const dev = env().NODE_ENV === "development";
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ""}`,
    // React renders style attributes (chart sizes, bars); style attributes cannot carry a nonce.
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
}

/** A 403 in the API's problem+json shape, for a refusal made before any page or action runs. */
function crossSiteProblem(detail: string, instance: string): NextResponse {
  const body = { type: "urn:bellwether:problem:forbidden", title: "Not allowed", status: 403, detail, instance };
  return new NextResponse(JSON.stringify(body), {
    status: 403,
    headers: { "content-type": "application/problem+json", "Content-Security-Policy": "default-src 'none'; frame-ancestors 'none'" },
  });
}

export async function proxy(request: NextRequest) {
  const { pathname, search } = request.nextUrl;
  const isApi = pathname.startsWith("/api/");

  if (!isApi && STATE_CHANGING_METHODS.has(request.method) && !request.headers.has("origin")) {
    const refusal = crossSiteRefusal(request.headers, originOf(env().NEXTAUTH_URL));
    if (refusal !== null) return crossSiteProblem(refusal, pathname);
  }

  if (isApi) {
    const response = NextResponse.next();
    response.headers.set("Content-Security-Policy", "default-src 'none'; frame-ancestors 'none'");
    return response;
  }

  const isPublic = PUBLIC_PAGES.some((p) => pathname === p || pathname.startsWith(`${p}/`));
  if (!isPublic) {
    const secureCookie = servedOverHttps(env().NEXTAUTH_URL);
    const token = await getToken({ req: request, secret: env().NEXTAUTH_SECRET, secureCookie, cookieName: sessionCookieName(secureCookie) });
    if (!token) {
      const signIn = new URL("/sign-in", request.url);
      if (pathname !== "/") signIn.searchParams.set("callbackUrl", `${pathname}${search}`);
      const redirect = NextResponse.redirect(signIn);
      redirect.headers.set("Content-Security-Policy", "default-src 'none'; frame-ancestors 'none'");
      return redirect;
    }
  }

  const nonce = Buffer.from(crypto.randomUUID()).toString("base64");
  const csp = contentSecurityPolicy(nonce);
  const requestHeaders = new Headers(request.headers);
  requestHeaders.set("x-nonce", nonce);
  requestHeaders.set("Content-Security-Policy", csp);
  const response = NextResponse.next({ request: { headers: requestHeaders } });
  response.headers.set("Content-Security-Policy", csp);
  return response;
}

export const config = {
  matcher: ["/((?!_next/static|_next/image|favicon.ico|fonts/).*)"],
};
