import "server-only";
import { config } from "@/lib/config";
import type { NextAuthOptions } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import { signInSchema } from "@/lib/validations/auth";
import { db } from "./db";
import { DUMMY_HASH, passwordMatches } from "./passwords";
import { endSession, SESSION_ABSOLUTE_MS, startSession } from "./sessions";
import {
  ACCOUNT_RULE,
  ADDRESS_RULE,
  clearFailures,
  recordFailure,
  throttleMessage,
  waitMs,
} from "./sign-in-throttle";

/**
 * next-auth with email + password (bcrypt hashes), JWT cookies that carry a user id and a session
 * id. The guard checks the session row (lib/server/sessions.ts) on every request, so sign-out, a
 * password change, removal from a team or a disabled account end it at once; teams and roles are
 * read from the database on every request too.
 */

/**
 * The client's address as Next passes it on: X-Forwarded-For, which `next start` sets from the
 * socket. A header of the client's own is dropped at start-up unless HEATCHECK_TRUST_PROXY=1
 * (instrumentation.ts); behind a reverse proxy, the last entry is the one that proxy saw.
 */
function clientAddress(headers: Record<string, unknown> | undefined): string {
  const raw = headers?.["x-forwarded-for"];
  const value =
    typeof raw === "string" ? raw : Array.isArray(raw) && typeof raw[0] === "string" ? raw[0] : "";
  const last = value.split(",").pop()?.trim();
  return last ? last : "unknown";
}

export const authOptions: NextAuthOptions = {
  session: { strategy: "jwt", maxAge: SESSION_ABSOLUTE_MS / 1000 },
  pages: { signIn: "/signin" },
  secret: config().authSecret,
  providers: [
    Credentials({
      name: "email and password",
      credentials: {
        email: { label: "Email", type: "email" },
        password: { label: "Password", type: "password" },
      },
      async authorize(raw, req) {
        const parsed = signInSchema.safeParse(raw);
        if (!parsed.success) return null;
        const email = parsed.data.email.toLowerCase();
        const accountKey = `account:${email}`;
        const addressKey = `address:${clientAddress(req.headers)}`;
        const wait = Math.max(waitMs(accountKey, ACCOUNT_RULE), waitMs(addressKey, ADDRESS_RULE));
        // A refused attempt checks no password and counts as no failure: waiting is all it takes.
        if (wait > 0) throw new Error(throttleMessage(wait));
        const user = await db.user.findUnique({ where: { email } });
        // Spend the same time for an unknown email as for a real check, so response times do not
        // reveal which emails exist; a disabled account answers like a wrong password.
        const ok = user
          ? await passwordMatches(parsed.data.password, user.passwordHash)
          : await passwordMatches(parsed.data.password, DUMMY_HASH).then(() => false);
        if (!user || !ok || user.disabledAt) {
          recordFailure(accountKey);
          recordFailure(addressKey);
          return null;
        }
        clearFailures(accountKey);
        return { id: user.id, email: user.email, name: user.name };
      },
    }),
  ],
  callbacks: {
    async jwt({ token, user }) {
      if (user) {
        token.uid = user.id;
        token.sid = await startSession(user.id);
      }
      return token;
    },
    session({ session, token }) {
      if (session.user && typeof token.uid === "string") session.user.id = token.uid;
      if (typeof token.sid === "string") session.sid = token.sid;
      return session;
    },
  },
  events: {
    async signOut({ token }) {
      if (typeof token?.sid === "string") await endSession(token.sid, "sign-out");
    },
  },
};
