import "server-only";
import { getServerSession } from "next-auth";
import { cookies } from "next/headers";
import { ForbiddenError, UnauthenticatedError } from "@/lib/errors";
import { isRole, type Actor, type Role } from "@/lib/roles";
import { authOptions } from "./auth-options";
import { assertRole, hashToken } from "./authorize";
import { db } from "./db";

export { assertRole, hashToken };

/**
 * The one guard. Every page, server action and route handler calls one of these first; each
 * returns an Actor whose team and role were just read from the database, or throws
 * UnauthenticatedError (401) / ForbiddenError (403). Services take that Actor and scope every
 * query by actor.teamId, which is therefore never undefined.
 */

export const TEAM_COOKIE = "hc-team";

/** A signed-in member of the active team with at least `minimum` role. */
export async function requireMember(minimum: Role = "viewer"): Promise<Actor> {
  const session = await getServerSession(authOptions);
  const userId = session?.user?.id;
  if (typeof userId !== "string" || userId === "") throw new UnauthenticatedError();
  const wanted = (await cookies()).get(TEAM_COOKIE)?.value;
  return actorForUser(userId, wanted, minimum);
}

/**
 * The membership of a user: in the wanted team if they belong to it, else their first team.
 * Exported for the tests, which have no request.
 */
export async function actorForUser(userId: string, wantedTeamId: string | undefined, minimum: Role): Promise<Actor> {
  const memberships = await db.membership.findMany({
    where: { userId },
    include: { user: { select: { name: true } } },
    orderBy: { id: "asc" },
  });
  const m = memberships.find((x) => x.teamId === wantedTeamId) ?? memberships[0];
  if (!m) throw new ForbiddenError("Your account is not a member of any team. Ask a team owner to add you.");
  if (!isRole(m.role)) throw new ForbiddenError();
  const actor: Actor = { teamId: m.teamId, role: m.role, userId, name: m.user.name, via: "session" };
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
  if (!m?.[1]) throw new UnauthenticatedError("Send an API token as: Authorization: Bearer <token>.");
  const token = await db.apiToken.findUnique({ where: { tokenHash: hashToken(m[1]) } });
  if (!token || token.revokedAt) throw new UnauthenticatedError("That API token is not valid or has been revoked.");
  // Best effort and at most once a minute: a read must not depend on a write (a full disk).
  if (!token.lastUsedAt || Date.now() - token.lastUsedAt.getTime() > 60_000) {
    void db.apiToken.update({ where: { id: token.id }, data: { lastUsedAt: new Date() } }).catch(() => undefined);
  }
  const actor: Actor = { teamId: token.teamId, role: "pilot", userId: null, name: `token ${token.name}`, via: "token" };
  assertRole(actor, minimum);
  return actor;
}

/** A route handler's caller: a bearer token when one is sent, else the signed-in session. */
export async function requireApiCaller(request: Request, minimum: Role = "viewer"): Promise<Actor> {
  if (request.headers.has("authorization")) return requireToken(request, minimum);
  return requireMember(minimum);
}
