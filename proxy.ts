import { withAuth, type NextRequestWithAuth } from "next-auth/middleware";
import { NextResponse } from "next/server";
import { contentSecurityPolicy, HSTS } from "@/lib/security-headers";

/**
 * Runs before every page and API answer: a fresh CSP nonce for each page (Next puts it on its own
 * scripts when it finds the policy on the request), HSTS over HTTPS, `Cache-Control: no-store` on
 * the API, and signed-out page visits sent to the sign-in screen. This is a convenience, not the
 * access control: every page, action and route handler checks session, role and team itself.
 */
function isPublic(pathname: string): boolean {
  return pathname.startsWith("/api/") || pathname === "/signin";
}

function withSecurityHeaders(request: NextRequestWithAuth): NextResponse {
  const https = request.nextUrl.protocol === "https:" || request.headers.get("x-forwarded-proto") === "https";
  const api = request.nextUrl.pathname.startsWith("/api/");
  const nonce = btoa(crypto.randomUUID());
  const csp = contentSecurityPolicy(nonce, { https, development: process.env.NODE_ENV === "development" });
  const requestHeaders = new Headers(request.headers);
  requestHeaders.set("x-nonce", nonce);
  requestHeaders.set("Content-Security-Policy", csp);
  const response = NextResponse.next({ request: { headers: requestHeaders } });
  response.headers.set("Content-Security-Policy", csp);
  if (https) response.headers.set("Strict-Transport-Security", HSTS);
  if (api) response.headers.set("Cache-Control", "no-store");
  return response;
}

export default withAuth(withSecurityHeaders, {
  pages: { signIn: "/signin" },
  callbacks: { authorized: ({ req, token }) => isPublic(req.nextUrl.pathname) || token !== null },
});

export const config = {
  matcher: ["/((?!_next/static|_next/image|favicon.ico|icon.svg).*)"],
};
