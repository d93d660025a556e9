import "server-only";
import bcrypt from "bcryptjs";
import { ForbiddenError, InputError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import { audit } from "./audit";
import { db } from "./db";
import { hashPassword } from "./passwords";

/** The signed-in person's own account: their teams and their password. */

export async function myTeams(actor: Actor) {
  if (!actor.userId) return [];
  return db.membership.findMany({ where: { userId: actor.userId }, include: { team: { select: { name: true } } }, orderBy: { id: "asc" } });
}

/** Checks that the user belongs to the team before the screen switches to it. */
export async function assertMemberOf(actor: Actor, teamId: string): Promise<void> {
  if (!actor.userId) throw new ForbiddenError("An API token belongs to one team.");
  const m = await db.membership.findUnique({ where: { userId_teamId: { userId: actor.userId, teamId } } });
  if (!m) throw new ForbiddenError("You are not a member of that team.");
}

export async function changePassword(actor: Actor, current: string, next: string): Promise<void> {
  if (!actor.userId) throw new ForbiddenError("An API token has no password.");
  const user = await db.user.findUnique({ where: { id: actor.userId } });
  if (!user || !(await bcrypt.compare(current, user.passwordHash))) {
    throw new InputError("The current password is not right; nothing was changed.", "current");
  }
  const passwordHash = await hashPassword(next);
  await db.$transaction(async (tx) => {
    await tx.user.update({ where: { id: user.id }, data: { passwordHash } });
    await audit(tx, actor, "change password", "user", user.id, user.email);
  });
}
