import "server-only";
import { InputError, NotFoundError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import { audit, writeAudited } from "./audit";
import { db, type Tx } from "./db";
import { assertRole } from "./authorize";

export async function listEvents(actor: Actor) {
  return db.event.findMany({
    where: { teamId: actor.teamId },
    orderBy: { startsAt: "desc" },
    include: {
      heats: {
        orderBy: { startsAt: "asc" },
        include: { entries: { include: { airframe: { select: { name: true } } } } },
      },
    },
  });
}

/** The latest heats an airframe is entered in (newest first, with their event): the crash form's choices. */
export async function heatsOfAirframe(actor: Actor, airframeId: string, take = 10) {
  return db.heat.findMany({
    where: { teamId: actor.teamId, entries: { some: { airframeId } } },
    include: { event: true },
    orderBy: { startsAt: "desc" },
    take,
  });
}

export async function createEvent(
  actor: Actor,
  input: { name: string; venue: string; startsAt: Date },
) {
  assertRole(actor, "tech");
  const create = (tx: Tx) => tx.event.create({ data: { ...input, teamId: actor.teamId } });
  return writeAudited(actor, ["create event", "event"], create, (e) => e.name);
}

export async function createHeat(
  actor: Actor,
  input: { eventId: string; name: string; startsAt: Date },
) {
  assertRole(actor, "tech");
  const event = await db.event.findFirst({ where: { id: input.eventId, teamId: actor.teamId } });
  if (!event) throw new NotFoundError("That event");
  const create = (tx: Tx) => tx.heat.create({ data: { ...input, teamId: actor.teamId } });
  return writeAudited(actor, ["create heat", "heat"], create, (h) => `${event.name} ${h.name}`);
}

/** Sets which airframes fly in a heat (replacing the previous list). */
export async function setHeatEntries(actor: Actor, heatId: string, airframeIds: string[]) {
  assertRole(actor, "tech");
  const heat = await db.heat.findFirst({ where: { id: heatId, teamId: actor.teamId } });
  if (!heat) throw new NotFoundError("That heat");
  const airframes = await db.airframe.findMany({
    where: { id: { in: airframeIds }, teamId: actor.teamId },
  });
  if (airframes.length !== new Set(airframeIds).size)
    throw new InputError("Every airframe must be one of this team's.", "airframeIds");
  return db.$transaction(async (tx) => {
    await tx.heatEntry.deleteMany({ where: { heatId } });
    for (const a of airframes) await tx.heatEntry.create({ data: { heatId, airframeId: a.id } });
    await audit(tx, actor, "assign heat", "heat", heatId, airframes.map((a) => a.name).join(", "));
  });
}
