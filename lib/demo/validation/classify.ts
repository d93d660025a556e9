import type { Axis } from "../../logs/columns";
import type { Assessment, Finding, FindingKind } from "../../health/compare";
import type { DamageClass } from "../fc-sim/damage";

/**
 * How the validation matrix reads an assessment: which damage classes each finding points to.
 * This is the one place that maps the engine's finding kinds onto the simulator's damage classes;
 * when the engine gains a kind, add it here (the `satisfies` below makes the type checker ask).
 *
 * The mapping follows the advice each finding's sentence gives (`ADVICE` in lib/health/detectors/advice.ts): a mode
 * that dropped points to a crack, several modes that dropped together to loose frame screws; a
 * new resonance to something loose (the stack, or a camera or antenna: one finding kind for both,
 * so either class counts); a band's level up to loose screws (or, above 600 Hz, a bearing); a
 * motor's orders to its prop, or with half orders (rattle) to its loose screws; broadband noise up
 * high to a bearing.
 */

export interface Diagnosis {
  classes: DamageClass[];
  axis: Axis;
  freqHz: number;
  motor?: number;
  points: number;
  finding: Finding;
}

type KindRule = (f: Finding, all: readonly Finding[]) => DamageClass[];

/** A finding of a mode that dropped, as a shift of at least this many percent. */
const DROP_PCT = 0;

function droppedModes(all: readonly Finding[]): Finding[] {
  return all.filter((f) => f.kind === "mode-shift" && (f.shiftPct ?? 0) < DROP_PCT);
}

const RULES = {
  "mode-shift": (f, all) => {
    if (!((f.shiftPct ?? 0) < DROP_PCT)) return [];
    // Two or more modes (different frequencies) down at once: the whole frame went soft.
    const drops = droppedModes(all);
    const distinct = new Set(drops.map((d) => Math.round(d.baselineFreqHz ?? d.freqHz))).size;
    return distinct >= 2 ? ["loose-frame"] : ["crack"];
  },
  // A mode no longer in sight: lowered and damped until it vanished (one: a crack; with other
  // modes dropped or lost too: the whole frame).
  "mode-lost": (_f, all) =>
    all.filter(
      (x) => x.kind === "mode-lost" || (x.kind === "mode-shift" && (x.shiftPct ?? 0) < DROP_PCT),
    ).length >= 2
      ? ["loose-frame"]
      : ["crack"],
  "new-peak": () => ["loose-stack", "loose-mount"],
  // Its sentence names loose screws, a cracked mount or rubbing below the floor corner, and
  // bearings or props above it: it does not point to a new resonance of a stack or a camera.
  "band-rise": (f) => (f.freqHz >= 600 ? ["bearing"] : ["loose-frame"]),
  // With several modes dropped at once its sentence points at the frame screws instead.
  "floor-rise": (f) => (f.cause === "frame" ? ["loose-frame"] : ["bearing"]),
  // Whole orders only: a prop; with tones between the orders (half orders, rattle): a loose motor.
  "motor-order": (f) => (f.cause === "motor-mount" ? ["loose-motor"] : ["bent-prop"]),
} satisfies Record<FindingKind, KindRule>;

/** The assessment's findings as diagnoses, the one taking most points first. */
export function diagnose(assessment: Assessment): Diagnosis[] {
  const out: Diagnosis[] = assessment.findings.map((f) => ({
    classes: (RULES[f.kind] as KindRule | undefined)?.(f, assessment.findings) ?? [],
    axis: f.axis,
    freqHz: f.freqHz,
    motor: f.motor,
    points: f.points,
    finding: f,
  }));
  return out.sort((a, b) => b.points - a.points);
}
