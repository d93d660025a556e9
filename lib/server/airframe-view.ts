import "server-only";
import { AXES, type Axis } from "@/lib/logs/columns";
import type { Actor } from "@/lib/roles";
import { airframeOfTeam } from "./airframes";
import { activeBaseline } from "./baselines";
import { db } from "./db";
import { installedParts } from "./parts";
import { decodeAnalysis, decodeAssessment, decodeCrashPositions } from "./stored";
import { spectrumOverlay, type SpectrumPoint } from "./spectrum-view";
import { scoreText } from "@/lib/view/score-text";

export interface TimelineItem {
  at: Date;
  kind: "crash" | "swap" | "log" | "baseline" | "inspection";
  text: string;
}

/** Everything the airframe screen shows, read once. */
export type AirframeView = Awaited<ReturnType<typeof airframeView>>;

/** Everything the airframe screen shows, read once. */
export async function airframeView(actor: Actor, airframeId: string) {
  const airframe = await airframeOfTeam(actor, airframeId);
  const [baseline, parts, logs, crashes, inspections, swaps, baselines] = await Promise.all([
    activeBaseline(airframe.id),
    installedParts(actor, airframe.id),
    db.flightLog.findMany({
      where: { airframeId: airframe.id, teamId: actor.teamId },
      orderBy: { flownAt: "desc" },
      include: { assessments: true },
    }),
    db.crash.findMany({ where: { airframeId: airframe.id }, orderBy: { at: "desc" } }),
    db.inspection.findMany({ where: { airframeId: airframe.id }, orderBy: { at: "desc" } }),
    db.installation.findMany({
      where: { airframeId: airframe.id },
      include: { part: true },
      orderBy: { fromAt: "desc" },
    }),
    db.baseline.findMany({ where: { airframeId: airframe.id }, orderBy: { createdAt: "desc" } }),
  ]);
  const assessed = logs.map((l) => {
    const a = baseline ? l.assessments.find((x) => x.baselineId === baseline.id) : undefined;
    return {
      log: l,
      assessment: a ? decodeAssessment(a) : null,
    };
  });
  const latest = assessed.find((x) => x.assessment) ?? null;
  const latestAnalysed = logs.find((l) => l.status === "analysed");
  const analysisRow = latestAnalysed
    ? await db.analysis.findUnique({ where: { logId: latestAnalysed.id } })
    : null;
  const analysis = analysisRow ? decodeAnalysis(analysisRow.json) : null;

  const spectra = {} as Record<Axis, SpectrumPoint[]>;
  for (const axis of AXES)
    spectra[axis] = analysis ? spectrumOverlay(analysis, axis, baseline?.baseline) : [];

  const timeline: TimelineItem[] = [
    ...crashes.map((c) => {
      const positions = decodeCrashPositions(c.positions);
      return {
        at: c.at,
        kind: "crash" as const,
        text: `${c.severity} crash${positions.length ? ` — ${positions.join(", ")}` : ""}${c.note ? `: ${c.note}` : ""}`,
      };
    }),
    ...swaps
      .filter((s) => s.reason !== "initial build")
      .map((s) => ({
        at: s.fromAt,
        kind: "swap" as const,
        text: `${s.position}: fitted ${s.part.kind} ${s.part.model} ${s.part.label} (${s.reason})`,
      })),
    ...logs.map((l) => {
      const a = assessed.find((x) => x.log.id === l.id)?.assessment;
      const inBaseline = baseline?.logIds.includes(l.id) ?? false;
      const verdict = a
        ? `${a.status}, score ${scoreText(a.score)}`
        : inBaseline
          ? "analysed; part of the active baseline"
          : "analysed; flown before the active baseline";
      return {
        at: l.flownAt,
        kind: "log" as const,
        text: `${l.fileName} — ${l.status === "analysed" ? verdict : l.status === "failed" ? `failed: ${l.error ?? ""}` : "analysing…"}`,
      };
    }),
    ...baselines.map((b) => ({
      at: b.createdAt,
      kind: "baseline" as const,
      text: `baseline set by ${b.setByName}: ${b.reason}${b.active ? " (active)" : ""}`,
    })),
    ...inspections.map((i) => ({
      at: i.at,
      kind: "inspection" as const,
      text: `signed off by ${i.signedOffName}: ${i.findings}${i.returnedToService ? " — returned to service" : ""}`,
    })),
  ].sort((a, b) => b.at.getTime() - a.at.getTime());

  const lastBaselineLog = baseline
    ? logs
        .filter((l) => baseline.logIds.includes(l.id))
        .reduce((t, l) => (l.flownAt > t ? l.flownAt : t), new Date(0))
    : null;
  const flightsSinceBaseline = lastBaselineLog
    ? logs.filter((l) => l.flownAt > lastBaselineLog).length
    : null;

  return {
    airframe,
    baseline,
    parts,
    logs: assessed,
    latest,
    analysis,
    analysedLogId: latestAnalysed?.id ?? null,
    spectra,
    timeline,
    flightsSinceBaseline,
  };
}
