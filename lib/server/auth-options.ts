import "server-only";
import bcrypt from "bcryptjs";
import type { NextAuthOptions } from "next-auth";
import Credentials from "next-auth/providers/credentials";
import { signInSchema } from "@/lib/validations/auth";
import { db } from "./db";
import { DUMMY_HASH } from "./passwords";

/**
 * next-auth with email + password (bcrypt hashes), JWT sessions. The session carries only the user
 * id; teams and roles are read from the database on every request by the guard.
 */
export const authOptions: NextAuthOptions = {
  session: { strategy: "jwt", maxAge: 14 * 24 * 3600 },
  pages: { signIn: "/signin" },
  secret: process.env.NEXTAUTH_SECRET,
  providers: [
    Credentials({
      name: "email and password",
      credentials: { email: { label: "Email", type: "email" }, password: { label: "Password", type: "password" } },
      async authorize(raw) {
        const parsed = signInSchema.safeParse(raw);
        if (!parsed.success) return null;
        const user = await db.user.findUnique({ where: { email: parsed.data.email.toLowerCase() } });
        if (!user) {
          // Spend the same time as a real check, so response times do not reveal which emails exist.
          await bcrypt.compare(parsed.data.password, DUMMY_HASH);
          return null;
        }
        const ok = await bcrypt.compare(parsed.data.password, user.passwordHash);
        return ok ? { id: user.id, email: user.email, name: user.name } : null;
      },
    }),
  ],
  callbacks: {
    jwt({ token, user }) {
      if (user) token.uid = user.id;
      return token;
    },
    session({ session, token }) {
      if (session.user && typeof token.uid === "string") session.user.id = token.uid;
      return session;
    },
  },
};


