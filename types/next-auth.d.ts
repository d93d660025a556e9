import "next-auth";

declare module "next-auth" {
  interface Session {
    user?: { id?: string; name?: string | null; email?: string | null; image?: string | null };
    /** the server-side session row (lib/server/sessions.ts) */
    sid?: string;
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    uid?: string;
    sid?: string;
  }
}
