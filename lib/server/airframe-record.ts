import "server-only";
import type { Actor } from "@/lib/roles";
import { crashRecord, inspectionRecord, logRecord } from "./airframe-history";
import { airframeByName } from "./airframes";
import { activeBaseline } from "./baselines";
import { db } from "./db";
import { installedParts } from "./parts";

/**
 * GET /api/v1/airframes/:name — the airframe's record: state, parts by position with life used,
 * crashes and inspections (newest first), the active baseline, and its logs with their latest verdict.
 */
export async function airframeRecord(actor: Actor, name: string) {
  const airframe = await airframeByName(actor, name);
  const where = { airframeId: airframe.id, teamId: actor.teamId };
  const [parts, crashes, inspections, logs, baseline] = await Promise.all([
    installedParts(actor, airframe.id),
    db.crash.findMany({ where, orderBy: { at: "desc" } }),
    db.inspection.findMany({ where, orderBy: { at: "desc" } }),
    db.flightLog.findMany({
      where,
      orderBy: { flownAt: "desc" },
      include: { assessments: { orderBy: { createdAt: "desc" }, take: 1 } },
    }),
    activeBaseline(airframe.id),
  ]);
  return {
    name: airframe.name,
    frameDesign: airframe.frameDesign,
    serial: airframe.serial,
    state: airframe.state,
    retired: airframe.retired,
    parts: parts.map((p) => ({
      position: p.position,
      kind: p.part.kind,
      model: p.part.model,
      label: p.part.label,
      since: p.fromAt,
      flights: p.life.flights,
      minutes: Math.round(p.life.minutes * 10) / 10,
      lifeUsed: p.life.fraction,
    })),
    crashes: crashes.map(crashRecord),
    inspections: inspections.map(inspectionRecord),
    baseline: baseline
      ? {
          setAt: baseline.createdAt,
          setBy: baseline.setByName,
          reason: baseline.reason,
          logs: baseline.logIds.length,
        }
      : null,
    logs: logs.map(logRecord),
  };
}
