import "server-only";
import { ConflictError, NotFoundError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import type { AirframeInput, AirframeState } from "@/lib/validations/airframe";
import { audit } from "./audit";
import { db } from "./db";
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

export async function createAirframe(actor: Actor, input: AirframeInput) {
  assertRole(actor, "tech");
  const existing = await db.airframe.findFirst({
    where: { teamId: actor.teamId, name: input.name },
  });
  if (existing) throw new ConflictError(`There is already an airframe named "${input.name}".`);
  return db.$transaction(async (tx) => {
    const a = await tx.airframe.create({ data: { ...input, teamId: actor.teamId } });
    await audit(tx, actor, "create", "airframe", a.id, a.name);
    return a;
  });
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
    const updated = await tx.airframe.update({ where: { id: a.id }, data: { state } });
    await audit(
      tx,
      actor,
      state === "grounded" ? "ground" : "return to service",
      "airframe",
      a.id,
      note,
    );
    return updated;
  });
}

export async function setAirframeRetired(actor: Actor, airframeId: string, retired: boolean) {
  assertRole(actor, "tech");
  const a = await airframeOfTeam(actor, airframeId);
  return db.$transaction(async (tx) => {
    const updated = await tx.airframe.update({ where: { id: a.id }, data: { retired } });
    await audit(tx, actor, retired ? "retire" : "reinstate", "airframe", a.id, a.name);
    return updated;
  });
}
