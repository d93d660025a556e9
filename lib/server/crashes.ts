import "server-only";
import { NotFoundError } from "@/lib/errors";
import { actorRef, type Actor } from "@/lib/roles";
import type { CrashInput } from "@/lib/validations/crash";
import type { InspectionInput } from "@/lib/validations/inspection";
import { airframeOfTeam, settleAirframe } from "./airframes";
import { db } from "./db";
import { assertRole } from "./authorize";
import { encodeCrashPositions } from "./stored";

/** The team, airframe and time every record of something that happened to an airframe carries. */
function onAirframe(actor: Actor, airframeId: string, at: Date) {
  return { teamId: actor.teamId, airframeId, at };
}

/** Logs a crash (pilots may). A hard crash or a destroyed airframe grounds it, as does the box. */
export async function logCrash(actor: Actor, input: CrashInput) {
  assertRole(actor, "pilot");
  const airframe = await airframeOfTeam(actor, input.airframeId);
  if (input.heatId) {
    const heat = await db.heat.findFirst({ where: { id: input.heatId, teamId: actor.teamId } });
    if (!heat) throw new NotFoundError("That heat");
  }
  const ground = input.ground || input.severity !== "minor";
  return db.$transaction(async (tx) => {
    const crash = await tx.crash.create({
      data: {
        ...onAirframe(actor, airframe.id, input.at),
        heatId: input.heatId,
        severity: input.severity,
        positions: encodeCrashPositions(input.positions),
        note: input.note,
        loggedById: actorRef(actor),
      },
    });
    await settleAirframe(tx, actor, airframe.id, {
      state: ground ? "grounded" : null,
      action: "log crash",
      detail: `${input.severity}${input.positions.length ? ` (${input.positions.join(", ")})` : ""}${ground ? ", grounded" : ""}`,
    });
    return crash;
  });
}

/** Records an inspection signed off by the acting tech; it can return the airframe to service. */
export async function recordInspection(actor: Actor, input: InspectionInput) {
  assertRole(actor, "tech");
  const airframe = await airframeOfTeam(actor, input.airframeId);
  return db.$transaction(async (tx) => {
    const inspection = await tx.inspection.create({
      data: {
        ...onAirframe(actor, airframe.id, input.at),
        findings: input.findings,
        checklist: JSON.stringify(input.checklist),
        signedOffById: actorRef(actor),
        signedOffName: actor.name,
        returnedToService: input.returnToService,
      },
    });
    await settleAirframe(tx, actor, airframe.id, {
      state: input.returnToService ? "ready" : null,
      action: "inspect",
      detail: input.returnToService ? "returned to service" : "still grounded",
    });
    return inspection;
  });
}
