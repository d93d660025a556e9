import "server-only";
import { NotFoundError } from "@/lib/errors";
import type { Actor } from "@/lib/roles";
import type { CrashInput } from "@/lib/validations/crash";
import type { InspectionInput } from "@/lib/validations/inspection";
import { airframeOfTeam } from "./airframes";
import { audit } from "./audit";
import { db } from "./db";
import { assertRole } from "./authorize";
import { encodeCrashPositions } from "./stored";

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
        teamId: actor.teamId,
        airframeId: airframe.id,
        at: input.at,
        heatId: input.heatId,
        severity: input.severity,
        positions: encodeCrashPositions(input.positions),
        note: input.note,
        loggedById: actor.userId ?? "token",
      },
    });
    if (ground)
      await tx.airframe.update({ where: { id: airframe.id }, data: { state: "grounded" } });
    await audit(
      tx,
      actor,
      "log crash",
      "airframe",
      airframe.id,
      `${input.severity}${input.positions.length ? ` (${input.positions.join(", ")})` : ""}${ground ? ", grounded" : ""}`,
    );
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
        teamId: actor.teamId,
        airframeId: airframe.id,
        at: input.at,
        findings: input.findings,
        checklist: JSON.stringify(input.checklist),
        signedOffById: actor.userId ?? "token",
        signedOffName: actor.name,
        returnedToService: input.returnToService,
      },
    });
    if (input.returnToService)
      await tx.airframe.update({ where: { id: airframe.id }, data: { state: "ready" } });
    await audit(
      tx,
      actor,
      "inspect",
      "airframe",
      airframe.id,
      input.returnToService ? "returned to service" : "still grounded",
    );
    return inspection;
  });
}
