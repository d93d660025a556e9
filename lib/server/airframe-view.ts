import "server-only";
import { DEFAULT_ANALYSIS } from "@/lib/analysis/settings";
import type { LogAnalysis } from "@/lib/analysis/types";
import type { Baseline } from "@/lib/health/baseline";
import type { Finding, NotCompared } from "@/lib/health/compare";
import type { Status } from "@/lib/health/thresholds";
import { AXES, type Axis } from "@/lib/logs/columns";
import type { Actor } from "@/lib/roles";
import { toDb } from "@/lib/signal/bands";
import { airframeOfTeam } from "./airframes";
import { activeBaseline } from "./baselines";
import { db } from "./db";
import { installedParts } from "./parts";

export interface SpectrumPoint {
  freqHz: number;
  current?: number;
  baseline?: number;
}

export interface TimelineItem {
  at: Date;
  kind: "crash" | "swap" | "log" | "baseline" | "inspection";
  text: string;
}

const MAX_POINTS = 450;

/** Everything the airframe screen shows, read once. */
export async function airframeView(actor: Actor, airframeId: string) {
  const airframe = await airframeOfTeam(actor, airframeId);
  const [baseline, parts, logs, crashes, inspections, swaps, baselines] = await Promise.all([
    activeBaseline(airframe.id),
    installedParts(actor, airframe.id),
    db.flightLog.findMany({ where: { airframeId: airframe.id, teamId: actor.teamId }, orderBy: { flownAt: "desc" }, include: { assessments: true } }),
    db.crash.findMany({ where: { airframeId: airframe.id }, orderBy: { at: "desc" } }),
    db.inspection.findMany({ where: { airframeId: airframe.id }, orderBy: { at: "desc" } }),
    db.installation.findMany({ where: { airframeId: airframe.id }, include: { part: true }, orderBy: { fromAt: "desc" } }),
    db.baseline.findMany({ where: { airframeId: airframe.id }, orderBy: { createdAt: "desc" } }),
  ]);
  const assessed = logs.map((l) => {
    const a = baseline ? l.assessments.find((x) => x.baselineId === baseline.id) : undefined;
    return {
      log: l,
      assessment: a
        ? { score: a.score, status: a.status as Status, findings: JSON.parse(a.findings) as Finding[], notCompared: JSON.parse(a.notCompared) as NotCompared[] }
        : null,
    };
  });
  const latest = assessed.find((x) => x.assessment) ?? null;
  const latestAnalysed = logs.find((l) => l.status === "analysed");
  const analysisRow = latestAnalysed ? await db.analysis.findUnique({ where: { logId: latestAnalysed.id } }) : null;
  const analysis = analysisRow ? (JSON.parse(analysisRow.json) as LogAnalysis) : null;

  const spectra = {} as Record<Axis, SpectrumPoint[]>;
  for (const axis of AXES) spectra[axis] = analysis ? spectrumOverlay(analysis, axis, baseline?.baseline) : [];

  const timeline: TimelineItem[] = [
    ...crashes.map((c) => ({ at: c.at, kind: "crash" as const, text: `${c.severity} crash${(JSON.parse(c.positions) as string[]).length ? ` — ${(JSON.parse(c.positions) as string[]).join(", ")}` : ""}${c.note ? `: ${c.note}` : ""}` })),
    ...swaps.filter((s) => s.reason !== "initial build").map((s) => ({ at: s.fromAt, kind: "swap" as const, text: `${s.position}: fitted ${s.part.kind} ${s.part.model} ${s.part.label} (${s.reason})` })),
    ...logs.map((l) => {
      const a = assessed.find((x) => x.log.id === l.id)?.assessment;
      const inBaseline = baseline?.logIds.includes(l.id) ?? false;
      const verdict = a ? `${a.status}, score ${a.score === null ? "–" : Math.round(a.score)}` : inBaseline ? "analysed; part of the active baseline" : "analysed; flown before the active baseline";
      return { at: l.flownAt, kind: "log" as const, text: `${l.fileName} — ${l.status === "analysed" ? verdict : l.status === "failed" ? `failed: ${l.error ?? ""}` : "analysing…"}` };
    }),
    ...baselines.map((b) => ({ at: b.createdAt, kind: "baseline" as const, text: `baseline set by ${b.setByName}: ${b.reason}${b.active ? " (active)" : ""}` })),
    ...inspections.map((i) => ({ at: i.at, kind: "inspection" as const, text: `signed off by ${i.signedOffName}: ${i.findings}${i.returnedToService ? " — returned to service" : ""}` })),
  ].sort((a, b) => b.at.getTime() - a.at.getTime());

  const lastBaselineLog = baseline ? logs.filter((l) => baseline.logIds.includes(l.id)).reduce((t, l) => (l.flownAt > t ? l.flownAt : t), new Date(0)) : null;
  const flightsSinceBaseline = lastBaselineLog ? logs.filter((l) => l.flownAt > lastBaselineLog).length : null;

  return { airframe, baseline, parts, logs: assessed, latest, analysis, analysedLogId: latestAnalysed?.id ?? null, spectra, timeline, flightsSinceBaseline };
}

/**
 * The latest log's spectrum against the baseline's, at matched throttle: both are averaged over
 * the throttle bands flown in both, weighted by the baseline's time in each, so that a harder or
 * gentler heat does not show as a difference. dB re 1 (deg/s)²/Hz.
 */
function spectrumOverlay(analysis: LogAnalysis, axis: Axis, baseline: Baseline | undefined): SpectrumPoint[] {
  const binHz = analysis.settings.binHz;
  const lo = analysis.settings.minFreqHz;
  const hi = Math.min(analysis.settings.maxFreqHz, baseline?.maxFreqHz ?? Infinity);
  const first = Math.ceil(lo / binHz);
  const last = Math.floor(hi / binHz);
  const step = Math.max(1, Math.ceil((last - first) / MAX_POINTS));
  const pairs = baseline
    ? baseline.throttleBands.flatMap((b) => {
        const mine = analysis.throttleBands.find((x) => x.index === b.index && x.segments >= DEFAULT_ANALYSIS.minBandSegments);
        return mine ? [{ weight: b.segments, log: mine.axes[axis].psdDb, base: b.axes[axis].psdDb }] : [];
      })
    : [];
  const total = pairs.reduce((s, p) => s + p.weight, 0);
  const mean = (pick: (p: (typeof pairs)[number]) => number[], k: number) =>
    toDb(pairs.reduce((s, p) => s + (p.weight / total) * 10 ** ((pick(p)[k] ?? -300) / 10), 0));
  const psd = analysis.axes[axis].psd;
  const points: SpectrumPoint[] = [];
  for (let k = first; k <= last; k += step) {
    // The largest value in each group keeps narrow peaks visible when points are thinned.
    let cur = -Infinity;
    for (let j = k; j < Math.min(k + step, last + 1); j++) cur = Math.max(cur, total > 0 ? mean((p) => p.log, j) : toDb(psd[j] ?? 0));
    const f = k * binHz;
    const point: SpectrumPoint = { freqHz: Math.round(f * 10) / 10, current: Math.round(cur * 100) / 100 };
    if (baseline && total > 0) {
      const bk = Math.round(f / baseline.binHz);
      let b = -Infinity;
      for (let j = bk; j < bk + step; j++) b = Math.max(b, mean((p) => p.base, j));
      point.baseline = Math.round(b * 100) / 100;
    }
    points.push(point);
  }
  return points;
}
