import { withAuth } from "next-auth/middleware";

// Sends signed-out visitors of a page to the sign-in screen. This is a convenience, not the
// access control: every page, action and route handler checks session, role and team itself.
export default withAuth({ pages: { signIn: "/signin" } });

export const config = {
  matcher: ["/((?!api|signin|_next|favicon.ico|icon.svg).*)"],
};
