import "server-only";
import { randomBytes } from "node:crypto";
import { ConflictError, ForbiddenError, NotFoundError } from "@/lib/errors";
import { parseColumnMap } from "@/lib/logs/columns";
import type { Actor, Role } from "@/lib/roles";
import { audit } from "./audit";
import { hashPassword } from "./passwords";
import { db } from "./db";
import { assertRole, hashToken } from "./authorize";

export async function listMembers(actor: Actor) {
  assertRole(actor, "owner");
  return db.membership.findMany({ where: { teamId: actor.teamId }, include: { user: { select: { name: true, email: true } } }, orderBy: { id: "asc" } });
}

/** Adds a member: a new account with a first password, or an existing account by email. */
export async function addMember(actor: Actor, input: { email: string; name: string; role: Role; password: string }) {
  assertRole(actor, "owner");
  const existing = await db.user.findUnique({ where: { email: input.email } });
  if (existing) {
    const already = await db.membership.findUnique({ where: { userId_teamId: { userId: existing.id, teamId: actor.teamId } } });
    if (already) throw new ConflictError(`${input.email} is already a member.`);
  }
  const passwordHash = existing ? null : await hashPassword(input.password);
  return db.$transaction(async (tx) => {
    const user = existing ?? (await tx.user.create({ data: { email: input.email, name: input.name, passwordHash: passwordHash ?? "" } }));
    const m = await tx.membership.create({ data: { userId: user.id, teamId: actor.teamId, role: input.role } });
    await audit(tx, actor, "add member", "membership", m.id, `${input.email} as ${input.role}`);
    return m;
  });
}

export async function changeRole(actor: Actor, membershipId: string, role: Role) {
  assertRole(actor, "owner");
  const m = await db.membership.findFirst({ where: { id: membershipId, teamId: actor.teamId } });
  if (!m) throw new NotFoundError("That member");
  if (m.role === "owner" && role !== "owner") {
    const owners = await db.membership.count({ where: { teamId: actor.teamId, role: "owner" } });
    if (owners <= 1) throw new ForbiddenError("A team needs at least one owner: make someone else owner first.");
  }
  return db.$transaction(async (tx) => {
    const updated = await tx.membership.update({ where: { id: m.id }, data: { role } });
    await audit(tx, actor, "change role", "membership", m.id, `${m.role} → ${role}`);
    return updated;
  });
}

export async function listTokens(actor: Actor) {
  assertRole(actor, "owner");
  return db.apiToken.findMany({ where: { teamId: actor.teamId }, orderBy: { createdAt: "desc" } });
}

/** Creates an API token. The token itself is returned once and only its hash is kept. */
export async function createToken(actor: Actor, name: string): Promise<{ token: string; id: string }> {
  assertRole(actor, "owner");
  const token = `hc_${randomBytes(24).toString("base64url")}`;
  const created = await db.$transaction(async (tx) => {
    const t = await tx.apiToken.create({
      data: { teamId: actor.teamId, name, prefix: token.slice(0, 7), tokenHash: hashToken(token), createdById: actor.userId ?? "" },
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

export async function recentAudit(actor: Actor, take = 30) {
  return db.auditEntry.findMany({ where: { teamId: actor.teamId }, orderBy: { at: "desc" }, take });
}
