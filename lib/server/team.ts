import "server-only";
import { randomBytes } from "node:crypto";
import { ConflictError, ForbiddenError, NotFoundError } from "@/lib/errors";
import { parseColumnMap } from "@/lib/logs/columns";
import { roleAtLeast, type Actor, type Role } from "@/lib/roles";
import { audit } from "./audit";
import { assertAcceptablePassword, hashPassword } from "./passwords";
import { db, type Tx } from "./db";
import { teamNameOf } from "./request-reads";
import { endUserSessions } from "./sessions";
import { assertRole, hashToken } from "./authorize";

/** The acting team's name, for the navigation bar. */
export async function teamName(actor: Actor): Promise<string> {
  return teamNameOf(actor.teamId);
}

export async function listMembers(actor: Actor) {
  assertRole(actor, "owner");
  return db.membership.findMany({
    where: { teamId: actor.teamId },
    include: { user: { select: { name: true, email: true } } },
    orderBy: { id: "asc" },
  });
}

/** Invitations of this team that nobody has answered yet (owners only). */
export async function pendingInvitations(actor: Actor) {
  assertRole(actor, "owner");
  return db.invitation.findMany({
    where: { teamId: actor.teamId, acceptedAt: null, declinedAt: null },
    orderBy: { createdAt: "asc" },
  });
}

/** The one answer to an invitation, whether or not the email already had an account. */
export function invitationMessage(email: string, role: Role): string {
  return `${email} is invited as ${role}. The invitation shows after they sign in: with the first password you gave if the email had no account here yet, otherwise with their own. They join once they accept.`;
}

/**
 * Invites a person into the team. No account is ever added without its owner's consent: an
 * unknown email gets a new account with the first password given, an existing one keeps its own
 * name and password, and either way the person joins only by accepting. The answer, the work done
 * (the password is checked and hashed either way) and what the owner sees afterwards are the same
 * in both cases, so an invitation reveals neither that an email exists nor its owner's name.
 */
export async function inviteMember(
  actor: Actor,
  input: { email: string; name: string; role: Role; password: string },
): Promise<string> {
  assertRole(actor, "owner");
  const email = input.email.trim().toLowerCase();
  await assertAcceptablePassword(input.password, { email, field: "password" });
  const passwordHash = await hashPassword(input.password);
  const existing = await db.user.findUnique({ where: { email } });
  if (existing) {
    // Only the team's own members are named here, and owners see those in the list anyway.
    const already = await db.membership.findUnique({
      where: { userId_teamId: { userId: existing.id, teamId: actor.teamId } },
    });
    if (already) throw new ConflictError(`${email} is already a member.`);
  }
  const open = await db.invitation.findFirst({
    where: { teamId: actor.teamId, email, acceptedAt: null, declinedAt: null },
  });
  if (open) throw new ConflictError(`${email} is already invited.`);
  await db.$transaction(async (tx) => {
    if (!existing) await tx.user.create({ data: { email, name: input.name, passwordHash } });
    const inv = await tx.invitation.create({
      data: { teamId: actor.teamId, email, role: input.role, invitedById: actor.userId ?? "" },
    });
    await audit(tx, actor, "invite member", "invitation", inv.id, `${email} as ${input.role}`);
  });
  return invitationMessage(email, input.role);
}

/** Withdraws an unanswered invitation. */
export async function withdrawInvitation(actor: Actor, invitationId: string): Promise<void> {
  assertRole(actor, "owner");
  const inv = await db.invitation.findFirst({
    where: { id: invitationId, teamId: actor.teamId, acceptedAt: null, declinedAt: null },
  });
  if (!inv) throw new NotFoundError("That invitation");
  await db.$transaction(async (tx) => {
    await tx.invitation.update({ where: { id: inv.id }, data: { declinedAt: new Date() } });
    await audit(tx, actor, "withdraw invitation", "invitation", inv.id, inv.email);
  });
}

async function assertNotLastOwner(actor: Actor, m: { role: string }, what: string): Promise<void> {
  if (m.role !== "owner") return;
  const owners = await db.membership.count({ where: { teamId: actor.teamId, role: "owner" } });
  if (owners <= 1)
    throw new ForbiddenError(
      `A team needs at least one owner: make someone else owner before ${what}.`,
    );
}

/** Pauses the live tokens a person created for this team, when they stop being one of its owners. */
async function suspendTokensOf(tx: Tx, actor: Actor, userId: string): Promise<number> {
  const r = await tx.apiToken.updateMany({
    where: { teamId: actor.teamId, createdById: userId, revokedAt: null, suspendedAt: null },
    data: { suspendedAt: new Date() },
  });
  return r.count;
}

export async function changeRole(actor: Actor, membershipId: string, role: Role) {
  assertRole(actor, "owner");
  const m = await db.membership.findFirst({ where: { id: membershipId, teamId: actor.teamId } });
  if (!m) throw new NotFoundError("That member");
  if (role !== "owner") await assertNotLastOwner(actor, m, "changing this role");
  return db.$transaction(async (tx) => {
    const updated = await tx.membership.update({ where: { id: m.id }, data: { role } });
    if (m.role === "owner" && role !== "owner") await suspendTokensOf(tx, actor, m.userId);
    await audit(tx, actor, "change role", "membership", m.id, `${m.role} → ${role}`);
    return updated;
  });
}

/**
 * Removes a member from the team (an owner may remove themselves, unless they are its last
 * owner). Every session of the removed person ends at once, and the API tokens they created for
 * the team stop until another owner confirms them.
 */
export async function removeMember(
  actor: Actor,
  membershipId: string,
): Promise<{ name: string; pausedTokens: number }> {
  assertRole(actor, "owner");
  const m = await db.membership.findFirst({
    where: { id: membershipId, teamId: actor.teamId },
    include: { user: { select: { name: true } } },
  });
  if (!m) throw new NotFoundError("That member");
  await assertNotLastOwner(actor, m, "removing this owner");
  const pausedTokens = await db.$transaction(async (tx) => {
    await tx.membership.delete({ where: { id: m.id } });
    const paused = m.role === "owner" ? await suspendTokensOf(tx, actor, m.userId) : 0;
    await audit(tx, actor, "remove member", "membership", m.id, `${m.user.name} (${m.role})`);
    return paused;
  });
  await endUserSessions(m.userId, "removed from a team");
  return { name: m.user.name, pausedTokens };
}

/** API tokens of the team, each with the name of the person who created it. */
export async function listTokens(actor: Actor) {
  assertRole(actor, "owner");
  const tokens = await db.apiToken.findMany({
    where: { teamId: actor.teamId },
    orderBy: { createdAt: "desc" },
  });
  const creators = await db.user.findMany({
    where: { id: { in: [...new Set(tokens.map((t) => t.createdById))] } },
    select: { id: true, name: true },
  });
  const nameOf = new Map(creators.map((u) => [u.id, u.name]));
  return tokens.map((t) => ({
    ...t,
    createdByName: nameOf.get(t.createdById) ?? "a former member",
  }));
}

/** Another owner's confirmation that a paused token (its creator is no longer an owner) may work again. */
export async function confirmToken(actor: Actor, tokenId: string): Promise<void> {
  assertRole(actor, "owner");
  const t = await db.apiToken.findFirst({
    where: { id: tokenId, teamId: actor.teamId, revokedAt: null },
  });
  if (!t?.suspendedAt) throw new NotFoundError("That paused token");
  if (t.createdById === actor.userId)
    throw new ForbiddenError("Another owner must confirm a token you created.");
  await db.$transaction(async (tx) => {
    await tx.apiToken.update({ where: { id: t.id }, data: { suspendedAt: null } });
    await audit(tx, actor, "confirm token", "token", t.id, t.name);
  });
}

export async function createToken(
  actor: Actor,
  name: string,
): Promise<{ token: string; id: string }> {
  assertRole(actor, "owner");
  const token = `hc_${randomBytes(24).toString("base64url")}`;
  const created = await db.$transaction(async (tx) => {
    const t = await tx.apiToken.create({
      data: {
        teamId: actor.teamId,
        name,
        prefix: token.slice(0, 7),
        tokenHash: hashToken(token),
        createdById: actor.userId ?? "",
      },
    });
    await audit(tx, actor, "create token", "token", t.id, name);
    return t;
  });
  return { token, id: created.id };
}

export async function revokeToken(actor: Actor, tokenId: string) {
  assertRole(actor, "owner");
  const t = await db.apiToken.findFirst({ where: { id: tokenId, teamId: actor.teamId } });
  if (!t) throw new NotFoundError("That token");
  return db.$transaction(async (tx) => {
    await tx.apiToken.update({ where: { id: t.id }, data: { revokedAt: new Date() } });
    await audit(tx, actor, "revoke token", "token", t.id, t.name);
  });
}

export async function listProfiles(actor: Actor) {
  return db.importProfile.findMany({ where: { teamId: actor.teamId }, orderBy: { name: "asc" } });
}

/** Saves a column map under a name (a second save under the same name replaces it). */
export async function saveProfile(actor: Actor, name: string, mapText: string) {
  assertRole(actor, "pilot");
  parseColumnMap(mapText);
  return db.$transaction(async (tx) => {
    const p = await tx.importProfile.upsert({
      where: { teamId_name: { teamId: actor.teamId, name } },
      create: { teamId: actor.teamId, name, mapText },
      update: { mapText },
    });
    await audit(tx, actor, "save import profile", "profile", p.id, name);
    return p;
  });
}

const EMAIL = /[^\s@:,()]+@[^\s@:,()]+\.[^\s@:,()]+/g;

/**
 * The team's recent changes. Emails are for the people who manage members: for any other role,
 * an email in an entry is shown as that member's name, or as "a person" when they are not one.
 */
export async function recentAudit(actor: Actor, take = 30) {
  const entries = await db.auditEntry.findMany({
    where: { teamId: actor.teamId },
    orderBy: { at: "desc" },
    take,
  });
  if (roleAtLeast(actor.role, "owner")) return entries;
  const members = await db.membership.findMany({
    where: { teamId: actor.teamId },
    include: { user: { select: { email: true, name: true } } },
  });
  const nameOf = new Map(members.map((m) => [m.user.email.toLowerCase(), m.user.name]));
  const hide = (text: string) =>
    text.replace(EMAIL, (e) => nameOf.get(e.toLowerCase()) ?? "a person");
  return entries.map((e) => ({ ...e, detail: hide(e.detail), userName: hide(e.userName) }));
}
