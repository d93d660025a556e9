import "server-only";
import { ConflictError, NotFoundError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import type { AirframeInput, AirframeState } from "@/lib/validations/airframe";
import { audit, writeAudited } from "./audit";
import { db, type Tx } from "./db";
import { assertRole } from "./authorize";

/** An airframe of the actor's team, or NotFoundError (also for another team's id). */
export async function airframeOfTeam(actor: Actor, airframeId: string) {
  const airframe = await db.airframe.findFirst({ where: { id: airframeId, teamId: actor.teamId } });
  if (!airframe) throw new NotFoundError("That airframe");
  return airframe;
}

export async function airframeByName(actor: Actor, name: string) {
  const airframe = await db.airframe.findFirst({ where: { teamId: actor.teamId, name } });
  if (!airframe) throw new NotFoundError(`An airframe named "${name}"`);
  return airframe;
}

/** The team's airframes in service (not retired), by name: for pickers on the upload and events screens. */
export async function airframesInService(actor: Actor): Promise<{ id: string; name: string }[]> {
  return db.airframe.findMany({
    where: { teamId: actor.teamId, retired: false },
    orderBy: { name: "asc" },
    select: { id: true, name: true },
  });
}

export async function createAirframe(actor: Actor, input: AirframeInput) {
  assertRole(actor, "tech");
  const existing = await db.airframe.findFirst({
    where: { teamId: actor.teamId, name: input.name },
  });
  if (existing) throw new ConflictError(`There is already an airframe named "${input.name}".`);
  const create = (tx: Tx) => tx.airframe.create({ data: { ...input, teamId: actor.teamId } });
  return writeAudited(actor, ["create", "airframe"], create, (a) => a.name);
}

/** Ground an airframe or return it to service (its `state`, not its health `status`). */
export async function setAirframeState(
  actor: Actor,
  airframeId: string,
  state: AirframeState,
  note: string,
) {
  assertRole(actor, "tech");
  const a = await airframeOfTeam(actor, airframeId);
  return db.$transaction(async (tx) => {
    await settleAirframe(tx, actor, a.id, {
      state,
      action: state === "grounded" ? "ground" : "return to service",
      detail: note,
    });
    return { ...a, state };
  });
}

/**
 * The end of every write about one airframe, inside its transaction: the airframe's new state when
 * the write changes it (a crash grounds, an inspection returns to service) and the audit entry.
 */
export async function settleAirframe(
  tx: Tx,
  actor: Actor,
  airframeId: string,
  change: { state: AirframeState | null; action: string; detail: string },
): Promise<void> {
  if (change.state)
    await tx.airframe.update({ where: { id: airframeId }, data: { state: change.state } });
  await audit(tx, actor, change.action, "airframe", airframeId, change.detail);
}

export async function setAirframeRetired(actor: Actor, airframeId: string, retired: boolean) {
  assertRole(actor, "tech");
  const a = await airframeOfTeam(actor, airframeId);
  const update = (tx: Tx) => tx.airframe.update({ where: { id: a.id }, data: { retired } });
  return writeAudited(actor, [retired ? "retire" : "reinstate", "airframe"], update, (u) => u.name);
}
