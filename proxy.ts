import { getToken } from "next-auth/jwt";
import { NextResponse, type NextRequest } from "next/server";
import { config as settings } from "@/lib/config";
import { contentSecurityPolicy, HSTS } from "@/lib/security-headers";

/**
 * Runs before every page and API answer: a fresh CSP nonce for each page (Next puts it on its own
 * scripts when it finds the policy on the request), HSTS over HTTPS, `Cache-Control: no-store` on
 * the API, and signed-out page visits sent to the sign-in screen. The redirect is a convenience,
 * not the access control: every page, action and route handler checks session, role and team
 * itself (lib/server/guard.ts). next-auth's withAuth is not used: it skips the sign-in page and
 * its own routes, which would leave them without these headers.
 */
function isPublic(pathname: string): boolean {
  return pathname.startsWith("/api/") || pathname === "/signin";
}

export async function proxy(request: NextRequest): Promise<NextResponse> {
  const { pathname, search } = request.nextUrl;
  const https =
    request.nextUrl.protocol === "https:" || request.headers.get("x-forwarded-proto") === "https";
  const { development, authSecret } = settings();
  const nonce = btoa(crypto.randomUUID());
  const csp = contentSecurityPolicy(nonce, {
    https,
    development,
  });

  let response: NextResponse;
  if (!isPublic(pathname) && !(await getToken({ req: request, secret: authSecret }))) {
    const signIn = new URL("/signin", request.nextUrl.origin);
    signIn.searchParams.set("callbackUrl", `${pathname}${search}`);
    response = NextResponse.redirect(signIn);
  } else {
    const requestHeaders = new Headers(request.headers);
    requestHeaders.set("x-nonce", nonce);
    requestHeaders.set("Content-Security-Policy", csp);
    response = NextResponse.next({ request: { headers: requestHeaders } });
  }
  response.headers.set("Content-Security-Policy", csp);
  if (https) response.headers.set("Strict-Transport-Security", HSTS);
  if (pathname.startsWith("/api/")) response.headers.set("Cache-Control", "no-store");
  return response;
}

// Not the upload endpoint (POST /api/v1/logs, exactly): when the proxy runs, Next clones the request
// body into memory for it and cuts the clone at 10 MB (experimental.proxyClientMaxBodySize), so a
// larger log would reach the route truncated. The upload needs neither a nonce nor the sign-in
// redirect; the route sets its own Cache-Control and next.config.ts adds the fixed headers.
export const config = {
  matcher: ["/((?!_next/static|_next/image|favicon.ico|icon.svg|api/v1/logs$).*)"],
};
