import "server-only";
import { InputError } from "@/lib/errors";
import type { LogAnalysis } from "@/lib/analysis/types";
import { buildBaseline, type Baseline } from "@/lib/health/baseline";
import { compareWithPositions } from "@/lib/health/compare";
import { actorRef, type Actor } from "@/lib/roles";
import { airframeOfTeam } from "./airframes";
import { storeAssessment } from "./assessments";
import { audit } from "./audit";
import { db, type Tx } from "./db";
import { assertRole } from "./authorize";
import { decodeAnalysis, decodeBaseline } from "./stored";

/**
 * Sets an airframe's baseline from chosen known-good logs: the old one is kept but made
 * inactive, and every analysed log of the airframe flown after the newest baseline log is scored
 * again against the new one.
 */
export async function setBaseline(
  actor: Actor,
  airframeId: string,
  logIds: string[],
  reason: string,
) {
  assertRole(actor, "tech");
  const airframe = await airframeOfTeam(actor, airframeId);
  const logs = await db.flightLog.findMany({
    where: { id: { in: logIds }, teamId: actor.teamId, airframeId: airframe.id },
    include: { analysis: true },
  });
  if (logs.length !== new Set(logIds).size)
    throw new InputError("Every baseline log must be a log of this airframe.", "logIds");
  const ready = logs.flatMap((l) =>
    l.status === "analysed" && l.analysis ? [{ ...l, analysis: l.analysis }] : [],
  );
  const notReady = logs.filter((l) => !ready.some((r) => r.id === l.id));
  if (notReady.length > 0)
    throw new InputError(
      `Wait for the analysis of ${notReady.map((l) => l.fileName).join(", ")} to finish.`,
      "logIds",
    );
  const analyses = ready.map((l) => decodeAnalysis(l.analysis.json));
  const baseline = buildBaseline(analyses);
  const newest = logs.reduce((t, l) => (l.flownAt > t ? l.flownAt : t), new Date(0));
  return db.$transaction(async (tx) => {
    await tx.baseline.updateMany({
      where: { airframeId: airframe.id, active: true },
      data: { active: false },
    });
    const created = await tx.baseline.create({
      data: {
        teamId: actor.teamId,
        airframeId: airframe.id,
        setById: actorRef(actor),
        setByName: actor.name,
        reason,
        json: JSON.stringify(baseline),
        logs: { create: logs.map((l) => ({ logId: l.id })) },
      },
    });
    const later = await rescoreLaterLogs(tx, airframe.id, newest, baseline, created.id);
    await audit(
      tx,
      actor,
      "set baseline",
      "airframe",
      airframe.id,
      `${logs.length} log(s): ${reason}; ${later} later log(s) re-scored`,
    );
    return { baseline: created, rescored: later };
  });
}

export async function activeBaseline(airframeId: string): Promise<{
  id: string;
  baseline: Baseline;
  createdAt: Date;
  reason: string;
  setByName: string;
  logIds: string[];
} | null> {
  const b = await db.baseline.findFirst({
    where: { airframeId, active: true },
    orderBy: { createdAt: "desc" },
    include: { logs: true },
  });
  return b
    ? {
        id: b.id,
        baseline: decodeBaseline(b.json),
        createdAt: b.createdAt,
        reason: b.reason,
        setByName: b.setByName,
        logIds: b.logs.map((l) => l.logId),
      }
    : null;
}

/**
 * Scores every analysed log of the airframe flown after `newest` against `baseline` (stored as
 * `baselineId`), skipping those `skip` says no to; returns how many were scored.
 */
export async function rescoreLaterLogs(
  tx: Tx,
  airframeId: string,
  newest: Date,
  baseline: Baseline,
  baselineId: string,
  skip: (logId: string, analysis: LogAnalysis) => boolean = () => false,
): Promise<number> {
  const later = await tx.flightLog.findMany({
    where: { airframeId, status: "analysed", flownAt: { gt: newest } },
    include: { analysis: true },
  });
  let scored = 0;
  for (const l of later) {
    if (!l.analysis) continue;
    const analysis = decodeAnalysis(l.analysis.json);
    if (skip(l.id, analysis)) continue;
    await storeAssessment(tx, l.id, compareWithPositions(analysis, baseline), baselineId);
    scored++;
  }
  return scored;
}
