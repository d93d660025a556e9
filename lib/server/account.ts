import "server-only";
import { ConflictError, ForbiddenError, InputError, NotFoundError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import { audit } from "./audit";
import { db } from "./db";
import { assertAcceptablePassword, hashPassword, passwordMatches } from "./passwords";
import { endUserSessions } from "./sessions";

/** The signed-in person's own account: their teams, their invitations and their password. */

export async function myTeams(actor: Actor) {
  if (!actor.userId) return [];
  return db.membership.findMany({
    where: { userId: actor.userId },
    include: { team: { select: { name: true } } },
    orderBy: { id: "asc" },
  });
}

/** Checks that the user belongs to the team before the screen switches to it. */
export async function assertMemberOf(actor: Actor, teamId: string): Promise<void> {
  if (!actor.userId) throw new ForbiddenError("An API token belongs to one team.");
  const m = await db.membership.findUnique({
    where: { userId_teamId: { userId: actor.userId, teamId } },
  });
  if (!m) throw new ForbiddenError("You are not a member of that team.");
}

/**
 * Changes the signed-in person's password and ends every other session of theirs (a stolen
 * session cookie stops working when its owner changes the password); the current one goes on.
 */
export async function changePassword(
  actor: Actor,
  current: string,
  next: string,
): Promise<{ endedSessions: number }> {
  if (!actor.userId) throw new ForbiddenError("An API token has no password.");
  const user = await db.user.findUnique({ where: { id: actor.userId } });
  if (!user || !(await passwordMatches(current, user.passwordHash))) {
    throw new InputError("The current password is not right; nothing was changed.", "current");
  }
  await assertAcceptablePassword(next, {
    email: user.email,
    field: "next",
    currentHash: user.passwordHash,
  });
  const passwordHash = await hashPassword(next);
  await db.$transaction(async (tx) => {
    await tx.user.update({ where: { id: user.id }, data: { passwordHash } });
    await audit(tx, actor, "change password", "user", user.id, user.name);
  });
  return { endedSessions: await endUserSessions(user.id, "password change", actor.sessionId) };
}

/** Invitations waiting for this person, matched by their account's email. */
export async function myInvitations(userId: string) {
  const user = await db.user.findUnique({ where: { id: userId }, select: { email: true } });
  if (!user) return [];
  return db.invitation.findMany({
    where: { email: user.email, acceptedAt: null, declinedAt: null },
    include: { team: { select: { name: true } } },
    orderBy: { createdAt: "asc" },
  });
}

/** Accepts (joins the team with the invited role) or declines an invitation addressed to this person. */
export async function answerInvitation(
  userId: string,
  invitationId: string,
  accept: boolean,
): Promise<{ teamId: string }> {
  const user = await db.user.findUnique({ where: { id: userId } });
  const inv = await db.invitation.findFirst({
    where: { id: invitationId, email: user?.email ?? "", acceptedAt: null, declinedAt: null },
  });
  if (!user || !inv) throw new NotFoundError("That invitation");
  const already = await db.membership.findUnique({
    where: { userId_teamId: { userId, teamId: inv.teamId } },
  });
  if (accept && already) throw new ConflictError("You are already a member of that team.");
  await db.$transaction(async (tx) => {
    await tx.invitation.update({
      where: { id: inv.id },
      data: accept ? { acceptedAt: new Date() } : { declinedAt: new Date() },
    });
    if (accept)
      await tx.membership.create({ data: { userId, teamId: inv.teamId, role: inv.role } });
    const actor: Actor = {
      teamId: inv.teamId,
      role: "viewer",
      userId,
      name: user.name,
      via: "session",
    };
    await audit(
      tx,
      actor,
      accept ? "accept invitation" : "decline invitation",
      "invitation",
      inv.id,
      `${user.name} as ${inv.role}`,
    );
  });
  return { teamId: inv.teamId };
}
