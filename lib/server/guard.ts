import "server-only";
import { getServerSession } from "next-auth";
import { cookies, headers } from "next/headers";
import { cache } from "react";
import { config } from "@/lib/config";
import { ForbiddenError, UnauthenticatedError } from "@/lib/errors";
import { isRole, type Actor, type Role } from "@/lib/roles";
import { authOptions } from "./auth-options";
import { assertRole, hashToken } from "./authorize";
import { db } from "./db";
import { membershipsOf, tokenByHash } from "./request-reads";
import { assertSessionOpen } from "./sessions";

export { assertRole, hashToken };

/**
 * The one guard. Every page, server action and route handler calls one of these first; each
 * returns an Actor whose team and role were just read from the database, or throws
 * UnauthenticatedError (401) / ForbiddenError (403). Services take that Actor and scope every
 * query by actor.teamId, which is therefore never undefined.
 */

/**
 * The active-team cookie follows the session cookie's rules: behind HTTPS (NEXTAUTH_URL starts
 * with https://) it is Secure and named with the __Secure- prefix, as next-auth names its own.
 */
export const SECURE_COOKIES = (config().configuredPublicUrl ?? "").startsWith("https://");
export const TEAM_COOKIE = SECURE_COOKIES ? "__Secure-hc-team" : "hc-team";
export const TEAM_COOKIE_OPTIONS = {
  httpOnly: true,
  sameSite: "lax",
  path: "/",
  secure: SECURE_COOKIES,
} as const;

/**
 * The signed-in person's open session: a server action (a cookie-authenticated write) must come
 * from this origin, like the API's writes, and the session row must still be open.
 */
async function openSession(): Promise<{ userId: string; sessionId: string }> {
  const h = await headers();
  if (h.has("next-action")) assertSameOrigin(h);
  const session = await getServerSession(authOptions);
  const userId = session?.user?.id;
  const sessionId = session?.sid;
  if (typeof userId !== "string" || userId === "" || typeof sessionId !== "string")
    throw new UnauthenticatedError();
  await assertSessionOpen(sessionId, userId);
  return { userId, sessionId };
}

/** A signed-in member of the active team with at least `minimum` role. */
export async function requireMember(minimum: Role = "viewer"): Promise<Actor> {
  // A server action may end the session or switch the team before the page renders again in the
  // same request, so it always reads afresh; a page render reads once for layout and page.
  const actor = (await headers()).has("next-action") ? await readMember() : await memberOfRender();
  assertRole(actor, minimum);
  return actor;
}

async function readMember(): Promise<Actor> {
  const { userId, sessionId } = await openSession();
  const wanted = (await cookies()).get(TEAM_COOKIE)?.value;
  const actor = await actorForUser(userId, wanted, "viewer");
  return { ...actor, sessionId };
}

/**
 * The member, read once per page render: the layout and the page both ask, and each read costs a
 * session-token decryption and two queries on the event loop (React's `cache` is per request).
 */
const memberOfRender = cache(readMember);

/**
 * Cross-site request forgery defence for writes made with the session cookie (OWASP ASVS 4.0
 * §4.2.2), the rule Next applies to server actions: the Origin header must name this server,
 * either the address people open (NEXTAUTH_URL) or the Host the request was sent to. A browser
 * always sends Origin on a cross-site POST and a page cannot forge it; a request without one is
 * refused. Bearer-token requests carry no ambient credential and are not checked.
 */
export function assertSameOrigin(h: Headers): void {
  const origin = h.get("origin");
  const refuse = () =>
    new ForbiddenError("This request came from another site; open heatcheck itself and try again.");
  if (!origin || origin === "null") throw refuse();
  let originUrl: URL;
  try {
    originUrl = new URL(origin);
  } catch {
    throw refuse();
  }
  const configured = config().configuredPublicUrl;
  if (configured) {
    try {
      if (new URL(configured).origin === originUrl.origin) return;
    } catch {
      // a malformed NEXTAUTH_URL leaves only the Host rule
    }
  }
  const host = h.get("x-forwarded-host") ?? h.get("host");
  if (host && host === originUrl.host) return;
  throw refuse();
}

export const NO_TEAM_MESSAGE =
  "Your account is not a member of any team. Ask a team owner to invite you.";

/**
 * The membership of a user: in the wanted team if they belong to it, else their first team.
 * Exported for the tests, which have no request.
 */
export async function actorForUser(
  userId: string,
  wantedTeamId: string | undefined,
  minimum: Role,
): Promise<Actor> {
  const memberships = await membershipsOf(userId);
  const m = memberships.find((x) => x.teamId === wantedTeamId) ?? memberships[0];
  if (!m) throw new ForbiddenError(NO_TEAM_MESSAGE);
  if (!isRole(m.role)) throw new ForbiddenError();
  const actor: Actor = {
    teamId: m.teamId,
    role: m.role,
    userId,
    name: m.userName,
    via: "session",
  };
  assertRole(actor, minimum);
  return actor;
}

/**
 * An API token from `Authorization: Bearer <token>`. A token acts for its team with the pilot
 * role: it may upload logs and read the queue and the airframes, nothing more.
 */
export async function requireToken(request: Request, minimum: Role = "viewer"): Promise<Actor> {
  const header = request.headers.get("authorization") ?? "";
  const m = /^Bearer\s+(\S+)$/i.exec(header);
  if (!m?.[1])
    throw new UnauthenticatedError("Send an API token as: Authorization: Bearer <token>.");
  const token = await tokenByHash(hashToken(m[1]));
  if (!token || token.revokedAt)
    throw new UnauthenticatedError("That API token is not valid or has been revoked.");
  if (token.suspendedAt)
    throw new UnauthenticatedError(
      "That API token is paused until another team owner confirms it.",
    );
  // Best effort and at most once a minute: a read must not depend on a write (a full disk).
  if (!token.lastUsedAt || Date.now() - token.lastUsedAt.getTime() > 60_000) {
    void db.apiToken
      .update({ where: { id: token.id }, data: { lastUsedAt: new Date() } })
      .catch(() => undefined);
  }
  const actor: Actor = {
    teamId: token.teamId,
    role: "pilot",
    userId: null,
    name: `token ${token.name}`,
    via: "token",
  };
  assertRole(actor, minimum);
  return actor;
}

/**
 * A route handler's caller: a bearer token when one is sent, else the signed-in session, whose
 * writes (any method but GET and HEAD) must come from this server's own pages.
 */
export async function requireApiCaller(request: Request, minimum: Role = "viewer"): Promise<Actor> {
  if (request.headers.has("authorization")) return requireToken(request, minimum);
  if (request.method !== "GET" && request.method !== "HEAD") assertSameOrigin(request.headers);
  return requireMember(minimum);
}

/** A signed-in person, whether or not they belong to a team yet (for accepting invitations). */
export async function requireUser(): Promise<{
  userId: string;
  sessionId: string;
  name: string;
  email: string;
}> {
  const { userId, sessionId } = await openSession();
  const user = await db.user.findUnique({
    where: { id: userId },
    select: { name: true, email: true },
  });
  if (!user) throw new UnauthenticatedError();
  return { userId, sessionId, name: user.name, email: user.email };
}
