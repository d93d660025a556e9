import NextAuth from "next-auth";
import { NextResponse } from "next/server";
import { authOptions } from "@/lib/server/auth-options";

type Handler = (
  request: Request,
  context: { params: Promise<{ nextauth: string[] }> },
) => Promise<Response>;
// next-auth v4 types its App Router handler loosely (any); this is the shape it is called with.
const handler = NextAuth(authOptions) as Handler;

/** next-auth's rule for a return address: http(s), or a path on this server. */
function isHttpUrl(value: string): boolean {
  try {
    return /^https?:$/.test(
      new URL(value, value.startsWith("/") ? "http://localhost" : undefined).protocol,
    );
  } catch {
    return false;
  }
}

const CALLBACK_COOKIES = ["next-auth.callback-url", "__Secure-next-auth.callback-url"];

/**
 * next-auth answers a return address such as `javascript:…` with a 500; it is bad input, so it is
 * refused here with a 400 and a sentence (and a bad return-address cookie is cleared).
 */
async function guarded(
  request: Request,
  context: { params: Promise<{ nextauth: string[] }> },
): Promise<Response> {
  const callbackUrl = new URL(request.url).searchParams.get("callbackUrl");
  const cookieHeader = request.headers.get("cookie") ?? "";
  const badCookie = CALLBACK_COOKIES.some((name) => {
    const m = new RegExp(`(?:^|;\\s*)${name.replace(/[.]/g, "\\.")}=([^;]*)`).exec(cookieHeader);
    if (!m?.[1]) return false;
    try {
      return !isHttpUrl(decodeURIComponent(m[1]));
    } catch {
      return true;
    }
  });
  if ((callbackUrl !== null && !isHttpUrl(callbackUrl)) || badCookie) {
    const response = NextResponse.json(
      {
        error: "That sign-in link's return address is not a web address on this server.",
        code: "bad-input",
      },
      { status: 400, headers: { "Cache-Control": "no-store" } },
    );
    for (const name of CALLBACK_COOKIES) response.cookies.delete(name);
    return response;
  }
  return handler(request, context);
}

export { guarded as GET, guarded as POST };
