import "server-only";
import type { Baseline } from "@/lib/health/baseline";
import { modeKey, trendPoint } from "@/lib/health/trends";
import { DEFAULT_THRESHOLDS } from "@/lib/health/thresholds";
import { db } from "./db";
import { decodeAnalysis } from "./stored";

/** The trend charts read at most this many of the newest logs (each analysis is parsed). */
const MAX_LOGS = 30;

export interface TrendRow {
  logId: string;
  fileName: string;
  /** Flight time, ms since the epoch (the chart's x). */
  t: number;
  [series: string]: number | string | null;
}

/**
 * The airframe screen's trends against the active baseline: each baseline mode's shift and each
 * axis's largest band rise at matched throttle, one point per analysed log, with the airframe's
 * work (crashes, swaps, inspections, baselines) on the same time axis and the thresholds to draw.
 */
export async function trendView(
  airframeId: string,
  teamId: string,
  baseline: { id: string; baseline: Baseline } | null,
) {
  if (!baseline) return null;
  const [logs, crashes, swaps, inspections, baselines] = await Promise.all([
    db.flightLog.findMany({
      where: { airframeId, teamId, status: "analysed" },
      orderBy: { flownAt: "desc" },
      take: MAX_LOGS,
      select: { id: true, fileName: true, flownAt: true, analysis: { select: { json: true } } },
    }),
    db.crash.findMany({ where: { airframeId, teamId }, select: { at: true, severity: true } }),
    db.installation.findMany({
      where: { airframeId, teamId, reason: { not: "initial build" } },
      select: { fromAt: true, position: true },
    }),
    db.inspection.findMany({ where: { airframeId, teamId }, select: { at: true } }),
    db.baseline.findMany({
      where: { airframeId, teamId },
      select: { createdAt: true, active: true },
    }),
  ]);
  const modes = baseline.baseline.modes.map(modeKey);
  const rows: TrendRow[] = logs
    .flatMap((l) => (l.analysis ? [{ ...l, analysis: l.analysis }] : []))
    .reverse()
    .map((l) => {
      const p = trendPoint(decodeAnalysis(l.analysis.json), baseline.baseline);
      const row: TrendRow = { logId: l.id, fileName: l.fileName, t: l.flownAt.getTime() };
      for (const m of modes) row[`mode:${m}`] = p.modeShiftPct[m] ?? null;
      for (const [axis, v] of Object.entries(p.bandRiseDb)) row[`band:${axis}`] = v;
      return row;
    });
  const events = [
    ...crashes.map((c) => ({ t: c.at.getTime(), label: `${c.severity} crash` })),
    ...swaps.map((s) => ({ t: s.fromAt.getTime(), label: `swap: ${s.position}` })),
    ...inspections.map((i) => ({ t: i.at.getTime(), label: "inspection" })),
    ...baselines.map((b) => ({
      t: b.createdAt.getTime(),
      label: b.active ? "baseline (active)" : "baseline",
    })),
  ].sort((a, b) => a.t - b.t);
  return {
    rows,
    modes,
    events,
    thresholds: {
      modeShiftPct: DEFAULT_THRESHOLDS.modeShiftPct,
      levelDb: DEFAULT_THRESHOLDS.levelDb,
    },
  };
}
