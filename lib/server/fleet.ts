import "server-only";
import type { Status } from "@/lib/health/thresholds";
import type { Actor } from "@/lib/roles";
import { db } from "./db";

/** One row per airframe for the Fleet table: health, score trend, last flight, flights since baseline. */
export async function fleetTable(actor: Actor) {
  const airframes = await db.airframe.findMany({
    where: { teamId: actor.teamId },
    orderBy: [{ retired: "asc" }, { name: "asc" }],
    include: {
      baselines: { where: { active: true }, include: { logs: { include: { log: { select: { flownAt: true } } } } }, take: 1 },
      logs: { orderBy: { flownAt: "asc" }, select: { id: true, flownAt: true, assessments: { select: { baselineId: true, score: true, status: true } } } },
    },
  });
  return airframes.map((a) => {
    const baseline = a.baselines[0];
    const scored = baseline
      ? a.logs.flatMap((l) => l.assessments.filter((x) => x.baselineId === baseline.id).map((x) => ({ score: x.score, status: x.status as Status })))
      : [];
    const since = baseline ? Math.max(...baseline.logs.map((l) => l.log.flownAt.getTime())) : null;
    const latest = scored[scored.length - 1];
    return {
      id: a.id,
      name: a.name,
      frameDesign: a.frameDesign,
      state: a.status,
      retired: a.retired,
      status: latest?.status ?? null,
      score: latest?.score ?? null,
      trend: scored.slice(-10).map((s) => s.score ?? 0),
      lastFlight: a.logs[a.logs.length - 1]?.flownAt ?? null,
      flightsSinceBaseline: since === null ? null : a.logs.filter((l) => l.flownAt.getTime() > since).length,
    };
  });
}
