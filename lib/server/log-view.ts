import "server-only";
import type { LogAnalysis } from "@/lib/analysis/types";
import { judgeAgainstFleet, memberFromLog, type FleetNote } from "@/lib/health/fleet-reference";
import { motorPositionName } from "@/lib/health/motor-positions";
import { NotFoundError } from "@/lib/errors";
import { DEFAULT_ANALYSIS } from "@/lib/analysis/settings";
import { AXES, type Axis } from "@/lib/logs/columns";
import { toDb } from "@/lib/signal/bands";
import type { Actor } from "@/lib/roles";
import { decodeAnalysis, decodeAssessment, decodeBaseline } from "./stored";
import { db } from "./db";
import { BAND_WORDS, fleetPlacement } from "./fleet";
import { spectrumOverlay, type SpectrumPoint } from "./spectrum-view";

/**
 * Everything the log screen shows for one log of the team: its verdict against the baseline it
 * was judged by (the active one when there is such an assessment, else the newest), its spectra
 * against that baseline, the throttle map, each motor's 1× order through the flight, the fleet's
 * view of it, its metadata and what was not compared.
 */
export async function logView(actor: Actor, logId: string) {
  const log = await db.flightLog.findFirst({
    where: { id: logId, teamId: actor.teamId },
    include: {
      airframe: { select: { id: true, name: true, frameDesign: true } },
      analysis: true,
      assessments: {
        include: {
          baseline: {
            select: { id: true, json: true, active: true, createdAt: true, reason: true },
          },
        },
        orderBy: { createdAt: "desc" },
      },
    },
  });
  if (!log) throw new NotFoundError("That log");
  const analysis = log.analysis ? decodeAnalysis(log.analysis.json) : null;
  const judged = log.assessments.find((a) => a.baseline.active) ?? log.assessments[0] ?? null;
  const baseline = judged ? decodeBaseline(judged.baseline.json) : undefined;
  const spectra = {} as Record<Axis, SpectrumPoint[]>;
  for (const axis of AXES)
    spectra[axis] = analysis ? spectrumOverlay(analysis, axis, baseline) : [];

  let fleetNotes: FleetNote[] = [];
  let fleetAirframes = 0;
  if (analysis && log.airframe) {
    const placement = (await fleetPlacement(actor)).placements.find(
      (p) => p.airframeId === log.airframe?.id,
    );
    if (placement) {
      fleetAirframes = placement.reference.enough ? placement.reference.airframes : 0;
      fleetNotes = judgeAgainstFleet(
        placement.reference,
        memberFromLog(log.airframe.id, log.airframe.name, analysis),
        { what: placement.judged === "baseline" ? "log-beside-baseline" : "log", ...BAND_WORDS },
      );
    }
  }

  return {
    log: {
      id: log.id,
      fileName: log.fileName,
      flownAt: log.flownAt,
      status: log.status,
      error: log.error,
      sizeBytes: log.sizeBytes,
      mapText: log.mapText,
    },
    airframe: log.airframe,
    analysis,
    assessment: judged
      ? {
          ...decodeAssessment(judged),
          baseline: {
            active: judged.baseline.active,
            createdAt: judged.baseline.createdAt,
            reason: judged.baseline.reason,
          },
        }
      : null,
    spectra,
    motors: (analysis?.motors ?? []).map((m) => ({
      motor: m.motor,
      name: motorPositionName(m.motor),
      meanRpm: m.meanRpm,
      track: m.track.map((p) => ({
        tS: Math.round(p.tS * 10) / 10,
        rotationHz: Math.round(p.rotationHz * 10) / 10,
        order1Db: Math.round(p.order1Db * 10) / 10,
      })),
    })),
    orders: analysis ? orderTable(analysis) : null,
    fleet: { airframes: fleetAirframes, notes: fleetNotes },
  };
}

/**
 * Each motor's order spectrum over the whole log: for every tracked order (0.5× … 4×, blade pass)
 * the level on the loudest axis, averaged in power over the well-flown throttle bands weighted by
 * their segments (dB re 1 (deg/s)²), with the share of the motor's telemetry that was masked.
 */
function orderTable(analysis: LogAnalysis) {
  const bands = analysis.throttleBands.filter(
    (b) => b.segments >= DEFAULT_ANALYSIS.minBandSegments,
  );
  const labels: string[] = [];
  for (const b of bands)
    for (const m of b.motors)
      for (const o of m.orders) if (!labels.includes(o.label)) labels.push(o.label);
  const orderOf = new Map<string, number>();
  for (const b of bands)
    for (const m of b.motors) for (const o of m.orders) orderOf.set(o.label, o.order);
  labels.sort((x, y) => (orderOf.get(x) ?? 0) - (orderOf.get(y) ?? 0));
  const motors = analysis.motors.map((summary) => {
    const levels = labels.map((label) => {
      let power = 0;
      let weight = 0;
      for (const b of bands) {
        const o = b.motors
          .find((m) => m.motor === summary.motor)
          ?.orders.find((x) => x.label === label);
        if (!o) continue;
        const loudest = Math.max(...AXES.map((a) => o.powerDb[a]));
        if (!Number.isFinite(loudest)) continue;
        power += b.segments * 10 ** (loudest / 10);
        weight += b.segments;
      }
      return weight > 0 ? Math.round(toDb(power / weight) * 10) / 10 : null;
    });
    return {
      motor: summary.motor,
      name: motorPositionName(summary.motor),
      meanRpm: Math.round(summary.meanRpm),
      maskedShare: summary.maskedShare ?? 0,
      levels,
    };
  });
  return { labels, motors };
}
