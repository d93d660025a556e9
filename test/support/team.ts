import type { Actor, Role } from "@/lib/roles";

/**
 * A team with one member of each role, as Actors the services accept. Call it after
 * freshDatabase(), which points the server modules at the test's own SQLite file.
 */
export async function makeTeam(name: string): Promise<Record<Role, Actor>> {
  const { db } = await import("@/lib/server/db");
  const { actorForUser } = await import("@/lib/server/guard");
  const team = await db.team.create({ data: { name } });
  const out = {} as Record<Role, Actor>;
  for (const role of ["owner", "tech", "pilot", "viewer"] as const) {
    const user = await db.user.create({
      data: { email: `${role}@${team.id}.test`, name: `${name} ${role}`, passwordHash: "x" },
    });
    await db.membership.create({ data: { userId: user.id, teamId: team.id, role } });
    out[role] = await actorForUser(user.id, team.id, "viewer");
  }
  return out;
}
