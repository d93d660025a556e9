import type { Finding } from "./compare";
import { MOTOR_POSITIONS } from "./motor-positions";
import {
  DEFAULT_THRESHOLDS,
  scoreForPoints,
  statusForScore,
  worstStatus,
  type HealthThresholds,
  type Status,
} from "./thresholds";

/**
 * What a repair does to the spectrum, so that the first log after it is told apart from damage:
 * a new arm has its own stiffness, so the frame's modes move; a new motor brings its own balance;
 * a new prop set changes every motor's orders. A baseline taken before such a repair is stale for
 * what the repair touched until the crew confirms a post-repair log as the new baseline.
 *
 * Which finding kinds each part kind can explain (common practice of the trade: the parts that
 * carry or make the vibration). Parts not listed here (ESC, video transmitter, receiver, antenna)
 * do not change the gyro spectrum enough to matter.
 */

export type Effect = "modes" | "new-peaks" | "levels" | "own-motor" | "all-motors";

export const REPAIR_EFFECTS: Readonly<Record<string, readonly Effect[]>> = {
  frame: ["modes", "new-peaks", "levels"],
  arm: ["modes", "new-peaks"],
  motor: ["own-motor"],
  "prop-set": ["all-motors"],
  "flight-controller": ["new-peaks", "levels"],
  camera: ["new-peaks"],
};

/** A part fitted to the airframe. */
export interface Repair {
  at: Date;
  position: string;
  kind: string;
  model: string;
}

/** The finding kinds an effect covers. Kinds not named (future ones included) are never explained away. */
const KINDS_OF: Record<Exclude<Effect, "own-motor" | "all-motors">, readonly string[]> = {
  modes: ["mode-shift", "mode-lost"],
  "new-peaks": ["new-peak"],
  levels: ["band-rise", "floor-rise"],
};

/** True when a fitted part can change the spectrum. */
export function changesSpectrum(kind: string): boolean {
  return (REPAIR_EFFECTS[kind]?.length ?? 0) > 0;
}

/** The motor number a motor position names: "motor 3 (rear-right)" → 3; null for other positions. */
export function motorAt(position: string): number | null {
  const m = /^motor\s+(\d+)/i.exec(position.trim());
  if (m?.[1]) return Number(m[1]);
  const where = Object.entries(MOTOR_POSITIONS).find(
    ([, name]) => position.toLowerCase() === `motor ${name}`,
  );
  return where ? Number(where[0]) : null;
}

/** Repairs after the baseline that change the spectrum: what makes that baseline stale. */
export function repairsSince(baselineAt: Date, repairs: readonly Repair[]): Repair[] {
  return repairs
    .filter((r) => r.at > baselineAt && changesSpectrum(r.kind))
    .sort((a, b) => a.at.getTime() - b.at.getTime());
}

function explains(repair: Repair, f: Finding): boolean {
  for (const effect of REPAIR_EFFECTS[repair.kind] ?? []) {
    if (effect === "all-motors" && f.motor !== undefined) return true;
    if (effect === "own-motor" && f.motor !== undefined && f.motor === motorAt(repair.position))
      return true;
    if (effect !== "all-motors" && effect !== "own-motor" && KINDS_OF[effect].includes(f.kind))
      return true;
  }
  return false;
}

export interface RepairExplained extends Finding {
  /** The repair that explains it, in words. */
  repair: string;
}

const DAY = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", timeZone: "UTC" });

/** "arm rear-left replaced on 2 Dec". */
export function repairWords(r: Repair): string {
  return `${r.position} replaced on ${DAY.format(r.at)}`;
}

/**
 * Splits a log's findings into those the repairs since the baseline explain ("changed after
 * repair", no points) and the rest, which stay findings; the score and status are taken from the
 * rest alone, the way the comparison takes them (100 minus the points; never better than any
 * remaining finding's severity). A stale baseline keeps the airframe at watch at best.
 */
export function separateRepairEffects(
  assessment: { score: number | null; status: Status; findings: readonly Finding[] },
  repairs: readonly Repair[],
  h: HealthThresholds = DEFAULT_THRESHOLDS,
): {
  score: number | null;
  status: Status;
  findings: Finding[];
  changedAfterRepair: RepairExplained[];
} {
  if (repairs.length === 0)
    return { ...assessment, findings: [...assessment.findings], changedAfterRepair: [] };
  const findings: Finding[] = [];
  const changedAfterRepair: RepairExplained[] = [];
  for (const f of assessment.findings) {
    const by = repairs.find((r) => explains(r, f));
    if (by)
      changedAfterRepair.push({
        ...f,
        points: 0,
        repair: repairWords(by),
        text: `changed after repair (${repairWords(by)}): ${f.text}`,
      });
    else findings.push(f);
  }
  if (assessment.score === null || !Number.isFinite(assessment.score))
    return {
      score: assessment.score,
      status: worstStatus(assessment.status, "watch"),
      findings,
      changedAfterRepair,
    };
  const score = scoreForPoints(findings.reduce((s, f) => s + f.points, 0));
  let status = worstStatus(statusForScore(score, h), "watch");
  for (const f of findings) status = worstStatus(status, f.severity);
  return { score, status, findings, changedAfterRepair };
}

/** The queue's sentence for a stale baseline. */
export function staleBaselineReason(repairs: readonly Repair[], postRepairLogs: number): string {
  const what = repairs.map(repairWords).join("; ");
  return postRepairLogs === 0
    ? `${what}: fly one log, then confirm a new baseline`
    : `${what}: ${postRepairLogs} log${postRepairLogs === 1 ? "" : "s"} flown since — check them, then confirm a new baseline from them`;
}
