import "server-only";
import { DEFAULT_ANALYSIS, throttleBandLabel } from "@/lib/analysis/settings";
import {
  buildFleetReference,
  judgeAgainstFleet,
  memberFromBaseline,
  memberFromLog,
  OUTLIER_Z,
  type FleetMember,
  type FleetNote,
  type FleetReference,
} from "@/lib/health/fleet-reference";
import type { Actor } from "@/lib/roles";
import { db } from "./db";
import { decodeAnalysis, decodeBaseline } from "./stored";

/**
 * One row per airframe for the Fleet table: latest score and its trend, last flight, flights since
 * baseline. The verdict beside them is the queue's (fleet-overview.ts adds it).
 */
export async function fleetTable(actor: Actor) {
  const airframes = await db.airframe.findMany({
    where: { teamId: actor.teamId },
    orderBy: [{ retired: "asc" }, { name: "asc" }],
    include: {
      baselines: {
        where: { active: true },
        include: { logs: { include: { log: { select: { flownAt: true } } } } },
        take: 1,
      },
      logs: {
        orderBy: { flownAt: "asc" },
        select: {
          id: true,
          flownAt: true,
          assessments: { select: { baselineId: true, score: true } },
        },
      },
    },
  });
  return airframes.map((a) => {
    const baseline = a.baselines[0];
    const scored = baseline
      ? a.logs.flatMap((l) =>
          l.assessments.filter((x) => x.baselineId === baseline.id).map((x) => x.score),
        )
      : [];
    const since = baseline ? Math.max(...baseline.logs.map((l) => l.log.flownAt.getTime())) : null;
    const latest = scored[scored.length - 1];
    return {
      id: a.id,
      name: a.name,
      frameDesign: a.frameDesign,
      state: a.state,
      retired: a.retired,
      score: latest ?? null,
      trend: scored.slice(-10).map((score) => score ?? 0),
      lastFlight: a.logs[a.logs.length - 1]?.flownAt ?? null,
      flightsSinceBaseline:
        since === null ? null : a.logs.filter((l) => l.flownAt.getTime() > since).length,
    };
  });
}

/** Labels for the notes: analysis band i as "170–230 Hz", throttle band j as "25–38 %". */
export const BAND_WORDS = {
  bandLabel: (band: number) => {
    const e = DEFAULT_ANALYSIS.bandEdgesHz;
    return `${e[band] ?? "?"}–${e[band + 1] ?? "?"} Hz`;
  },
  throttleLabel: (tb: number) =>
    throttleBandLabel(
      tb / DEFAULT_ANALYSIS.throttleBands,
      (tb + 1) / DEFAULT_ANALYSIS.throttleBands,
    ),
};

/**
 * Each active airframe's place in its design's fleet: an airframe with a baseline has that baseline
 * questioned when it sits off its sisters; one without a baseline has its latest analysed log judged
 * against them. The reference each is judged by leaves it out. Grounded airframes do not count
 * towards a reference (they are known not to be healthy).
 */
export interface AirframePlacement {
  airframeId: string;
  name: string;
  design: string;
  /** What was judged against the fleet: the airframe's baseline, its latest log (no baseline), or nothing. */
  judged: "baseline" | "log" | null;
  logId: string | null;
  /** The design's reference without this airframe. */
  reference: FleetReference;
  notes: FleetNote[];
}

export interface FleetPlacement {
  placements: AirframePlacement[];
  /** Each design's reference over all its healthy airframes (for the fleet screen). */
  designs: FleetReference[];
}

export async function fleetPlacement(actor: Actor): Promise<FleetPlacement> {
  // The placement parses every active baseline of the team: keep the last one per team and
  // reuse it while nothing it rests on has changed (the queue asks for it on every refresh).
  const sources = await placementSources(actor);
  const fingerprint = sources
    .map((r) =>
      [r.id, r.name, r.frameDesign, r.state, r.baselines[0]?.id ?? "", r.logs[0]?.id ?? ""].join(
        "|",
      ),
    )
    .join(";");
  const cached = placementCache.get(actor.teamId);
  if (cached && cached.fingerprint === fingerprint) return cached.value;
  const value = await computePlacement(sources);
  placementCache.set(actor.teamId, { fingerprint, value });
  return value;
}

const globalForFleet = globalThis as unknown as {
  heatcheckFleetCache?: Map<string, { fingerprint: string; value: FleetPlacement }>;
};
const placementCache = (globalForFleet.heatcheckFleetCache ??= new Map<
  string,
  { fingerprint: string; value: FleetPlacement }
>());

/** What the placement rests on, read cheaply: airframes, their state and design, active baseline, latest analysed log. */
function placementSources(actor: Actor) {
  return db.airframe.findMany({
    where: { teamId: actor.teamId, retired: false },
    orderBy: { name: "asc" },
    select: {
      id: true,
      name: true,
      frameDesign: true,
      state: true,
      baselines: {
        where: { active: true },
        orderBy: { createdAt: "desc" },
        take: 1,
        select: { id: true },
      },
      logs: {
        where: { status: "analysed" },
        orderBy: { flownAt: "desc" },
        take: 1,
        select: { id: true },
      },
    },
  });
}

async function computePlacement(
  airframes: Awaited<ReturnType<typeof placementSources>>,
): Promise<FleetPlacement> {
  const baselineIds = airframes.flatMap((a) => a.baselines.map((b) => b.id));
  const logIds = airframes
    .filter((a) => a.baselines.length === 0)
    .flatMap((a) => a.logs.map((l) => l.id));
  const [baselineRows, analysisRows] = await Promise.all([
    db.baseline.findMany({ where: { id: { in: baselineIds } }, select: { id: true, json: true } }),
    db.analysis.findMany({ where: { logId: { in: logIds } }, select: { logId: true, json: true } }),
  ]);
  const baselineJson = new Map(baselineRows.map((b) => [b.id, b.json]));
  const analysisJson = new Map(analysisRows.map((a) => [a.logId, a.json]));
  const members = new Map<string, FleetMember[]>();
  const subjects = airframes.map((a) => {
    const bJson = baselineJson.get(a.baselines[0]?.id ?? "");
    const logId = a.logs[0]?.id ?? null;
    const aJson = logId ? analysisJson.get(logId) : undefined;
    const fromBaseline = bJson ? memberFromBaseline(a.id, a.name, decodeBaseline(bJson)) : null;
    if (fromBaseline && a.state !== "grounded")
      members.set(a.frameDesign, [...(members.get(a.frameDesign) ?? []), fromBaseline]);
    const fromLog =
      !fromBaseline && aJson ? memberFromLog(a.id, a.name, decodeAnalysis(aJson)) : null;
    return { airframe: a, fromBaseline, fromLog, logId };
  });
  const placements = subjects.map(({ airframe, fromBaseline, fromLog, logId }) => {
    const reference = buildFleetReference(
      airframe.frameDesign,
      members.get(airframe.frameDesign) ?? [],
      airframe.id,
    );
    const subject = fromBaseline ?? fromLog;
    const notes = subject
      ? judgeAgainstFleet(reference, subject, {
          what: fromBaseline ? "baseline" : "log",
          ...BAND_WORDS,
        })
      : [];
    const placement: AirframePlacement = {
      airframeId: airframe.id,
      name: airframe.name,
      design: airframe.frameDesign,
      judged: fromBaseline ? "baseline" : fromLog && reference.enough ? "log" : null,
      logId,
      reference,
      notes,
    };
    return placement;
  });
  const designs = [...new Set(airframes.map((a) => a.frameDesign))].map((design) =>
    buildFleetReference(design, members.get(design) ?? []),
  );
  return { placements, designs };
}

export interface ModeStrip {
  axis: string;
  medianHz: number;
  /** The band drawn shaded: median ± 3.5 robust σ (floored as the judgement floors it). */
  loHz: number;
  hiHz: number;
  dots: { name: string; freqHz: number; outlier: boolean }[];
}

/**
 * The dots of one mode's strip: every member's frequency, plus each airframe whose baseline the
 * fleet questions for this mode, at the frequency the judgement found (a mode that moved far can
 * fall out of the cluster the reference is built from, and must still be seen on its strip).
 */
function stripDots(
  mode: FleetReference["modes"][number],
  judged: AirframePlacement[],
  nameOf: Map<string, string>,
): ModeStrip["dots"] {
  const offFor = (p: AirframePlacement) =>
    p.notes.find(
      (n) =>
        n.kind === "mode-off-fleet" &&
        n.axis === mode.axis &&
        Math.abs((n.fleetHz ?? 0) - mode.medianHz) <= 0.15 * mode.medianHz,
    );
  const dots = mode.members.map((x) => ({
    name: nameOf.get(x.id) ?? "?",
    freqHz: x.freqHz,
    outlier: false,
    id: x.id,
  }));
  for (const p of judged) {
    const note = offFor(p);
    if (!note || note.freqHz === undefined) continue;
    const had = dots.find((d) => d.id === p.airframeId);
    if (had) {
      had.freqHz = note.freqHz;
      had.outlier = true;
    } else dots.push({ name: p.name, freqHz: note.freqHz, outlier: true, id: p.airframeId });
  }
  return dots.map(({ name, freqHz, outlier }) => ({ name, freqHz, outlier }));
}

/** The fleet screen's view of each design: one strip per fleet mode with every airframe's baseline frequency. */
export async function fleetDesignView(actor: Actor) {
  const { designs, placements } = await fleetPlacement(actor);
  const nameOf = new Map(placements.map((p) => [p.airframeId, p.name]));
  return designs.map((ref) => ({
    design: ref.design,
    airframes: ref.airframes,
    enough: ref.enough,
    strips: ref.modes.map((m): ModeStrip => {
      const sigma = Math.max(m.sigmaHz, 0.01 * m.medianHz);
      return {
        axis: m.axis,
        medianHz: m.medianHz,
        loHz: m.medianHz - OUTLIER_Z * sigma,
        hiHz: m.medianHz + OUTLIER_Z * sigma,
        dots: stripDots(
          m,
          placements.filter((p) => p.design === ref.design && p.judged === "baseline"),
          nameOf,
        ),
      };
    }),
    // Airframes judged against the fleet because they have no baseline, with what the fleet says.
    withoutBaseline: placements
      .filter((p) => p.design === ref.design && p.judged === "log")
      .map((p) => ({ name: p.name, notes: p.notes.map((n) => n.text) })),
  }));
}
