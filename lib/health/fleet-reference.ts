import { DEFAULT_ANALYSIS } from "../analysis/settings";
import type { LogAnalysis } from "../analysis/types";
import { AXES, type Axis } from "../logs/columns";
import { median } from "../signal/stats";
import type { Baseline } from "./baseline";
import { DEFAULT_THRESHOLDS, stepOf, type HealthThresholds, type Status } from "./thresholds";

/**
 * The fleet as its own reference: airframes of one frame design fly the same structure, so the
 * spread of their known-good baselines says what "normal" is for that design. Used to judge an
 * airframe that has no baseline of its own yet, and to question a baseline that sits far from its
 * sisters (taken after damage, or a softer spare fitted).
 *
 * Statistics are robust, because the fleet may contain the very airframe that is wrong: the centre
 * is the median and the spread the median absolute deviation, scaled by 1.4826 to estimate a
 * standard deviation for normal data; a value is an outlier when its robust z-score exceeds 3.5
 * (B. Iglewicz, D. C. Hoaglin, "How to Detect and Handle Outliers", ASQC 1993: the modified
 * z-score 0.6745·(x − median)/MAD > 3.5). The airframe being judged is always left out of the
 * reference it is judged against.
 */

/** Fewer airframes than this make no reference: the median of two says nothing about spread. */
export const MIN_FLEET_AIRFRAMES = 3;
/** Scale from MAD to a standard deviation for normally distributed data (1/Φ⁻¹(3/4)). */
const MAD_TO_SIGMA = 1.4826;
/** Modified z-score above which a value is an outlier (Iglewicz & Hoaglin 1993). */
export const OUTLIER_Z = 3.5;
/**
 * The smallest spread we credit a fleet with, so that a fleet of near-perfect copies does not flag
 * the jitter of picking a peak on a ~2 Hz grid: 1 % of a mode's frequency, 1.5 dB of a band level.
 * Our own choice, not a published figure.
 */
const MIN_MODE_SIGMA_FRACTION = 0.01;
const MIN_LEVEL_SIGMA_DB = 1.5;
/** Mode frequencies of different airframes this close (fraction of the lower) are the same mode. */
const SAME_MODE_GAP_FRACTION = 0.1;
/** A subject's mode is looked for this far (fraction) either side of the fleet's median. */
const SEARCH_WINDOW_FRACTION = 0.15;
/** A fleet mode counts as one every airframe has when this share of the fleet shows it. */
const COMMON_MODE_SHARE = 0.75;

export interface FleetMember {
  id: string;
  name: string;
  /** Structural modes of its baseline (or of a log, for a subject without one). */
  modes: readonly { axis: Axis; freqHz: number }[];
  /** Band levels at matched throttle: dB re 1 (deg/s)², keyed by throttle band, axis and analysis band. */
  levels: readonly BandLevel[];
}

export interface BandLevel {
  throttleBand: number;
  axis: Axis;
  band: number;
  db: number;
}

export interface FleetMode {
  axis: Axis;
  medianHz: number;
  /** Robust standard deviation, Hz (1.4826 · MAD), before the floor. */
  sigmaHz: number;
  members: { id: string; freqHz: number }[];
}

export interface FleetLevel extends Omit<BandLevel, "db"> {
  medianDb: number;
  sigmaDb: number;
  airframes: number;
}

export interface FleetReference {
  design: string;
  /** Airframes the reference rests on. */
  airframes: number;
  /** False with fewer than MIN_FLEET_AIRFRAMES: the reference is shown but judges nothing. */
  enough: boolean;
  modes: FleetMode[];
  levels: FleetLevel[];
}

/** Median absolute deviation about the median. */
export function medianAbsoluteDeviation(values: readonly number[]): number {
  const m = median(values);
  return median(values.map((v) => Math.abs(v - m)));
}

/** (x − median) / (1.4826 · MAD), with the spread floored at minSigma. */
export function robustZ(x: number, centre: number, sigma: number, minSigma: number): number {
  return (x - centre) / Math.max(sigma, minSigma);
}

/** The reference of one design from its members' baselines, leaving out `excludeId`. */
export function buildFleetReference(
  design: string,
  members: readonly FleetMember[],
  excludeId?: string,
): FleetReference {
  const fleet = members.filter((m) => m.id !== excludeId);
  return {
    design,
    airframes: fleet.length,
    enough: fleet.length >= MIN_FLEET_AIRFRAMES,
    modes: clusterModes(fleet),
    levels: pooledLevels(fleet),
  };
}

function clusterModes(fleet: readonly FleetMember[]): FleetMode[] {
  const out: FleetMode[] = [];
  const axes = [...new Set(fleet.flatMap((m) => m.modes.map((x) => x.axis)))];
  for (const axis of axes) {
    const all = fleet
      .flatMap((m) =>
        m.modes.filter((x) => x.axis === axis).map((x) => ({ id: m.id, freqHz: x.freqHz })),
      )
      .sort((a, b) => a.freqHz - b.freqHz);
    let group: { id: string; freqHz: number }[] = [];
    const close = () => {
      if (group.length === 0) return;
      const centre = median(group.map((g) => g.freqHz));
      // One frequency per airframe: the one nearest the group's centre.
      const byId = new Map<string, number>();
      for (const g of group) {
        const had = byId.get(g.id);
        if (had === undefined || Math.abs(g.freqHz - centre) < Math.abs(had - centre))
          byId.set(g.id, g.freqHz);
      }
      const members = [...byId].map(([id, freqHz]) => ({ id, freqHz }));
      // A mode only some airframes show is not a property of the design.
      if (members.length >= 2 && members.length >= fleet.length / 2) {
        const freqs = members.map((m) => m.freqHz);
        out.push({
          axis,
          medianHz: median(freqs),
          sigmaHz: MAD_TO_SIGMA * medianAbsoluteDeviation(freqs),
          members,
        });
      }
      group = [];
    };
    for (const m of all) {
      const last = group[group.length - 1];
      if (last && m.freqHz - last.freqHz > SAME_MODE_GAP_FRACTION * last.freqHz) close();
      group.push(m);
    }
    close();
  }
  return out;
}

function pooledLevels(fleet: readonly FleetMember[]): FleetLevel[] {
  const cells = new Map<string, { key: Omit<BandLevel, "db">; values: number[] }>();
  for (const m of fleet) {
    for (const l of m.levels) {
      if (!Number.isFinite(l.db)) continue;
      const k = `${l.throttleBand}:${l.axis}:${l.band}`;
      const cell = cells.get(k) ?? {
        key: { throttleBand: l.throttleBand, axis: l.axis, band: l.band },
        values: [],
      };
      cell.values.push(l.db);
      cells.set(k, cell);
    }
  }
  return [...cells.values()].map(({ key, values }) => ({
    ...key,
    medianDb: median(values),
    sigmaDb: MAD_TO_SIGMA * medianAbsoluteDeviation(values),
    airframes: values.length,
  }));
}

export type FleetNoteKind = "mode-off-fleet" | "mode-missing" | "level-above-fleet";

export interface FleetNote {
  kind: FleetNoteKind;
  axis: Axis;
  /** The subject's frequency (mode notes) or the fleet mode's (missing); absent for levels. */
  freqHz?: number;
  fleetHz?: number;
  deviationPct?: number;
  deltaDb?: number;
  z?: number;
  band?: number;
  throttleBand?: number;
  severity: Exclude<Status, "ok">;
  text: string;
}

export interface JudgeOptions {
  /**
   * "baseline": questions a baseline; "log": judges a log of an airframe without one (the fleet
   * stands in for it); "log-beside-baseline": a log that its own baseline scored (the fleet is a
   * second opinion).
   */
  what: "baseline" | "log" | "log-beside-baseline";
  /** Words for an analysis band and a throttle band, from the caller's settings. */
  bandLabel: (band: number) => string;
  throttleLabel: (throttleBand: number) => string;
  thresholds?: HealthThresholds;
}

const AXIS_WORD: Record<Axis, string> = { roll: "roll", pitch: "pitch", yaw: "yaw (torsion)" };

const round1 = (v: number) => Math.round(v * 10) / 10;

/**
 * Places one airframe's modes and levels against the fleet's reference (which must have been built
 * without it). Nothing is said when the reference rests on too few airframes.
 */
export function judgeAgainstFleet(
  reference: FleetReference,
  subject: FleetMember,
  options: JudgeOptions,
): FleetNote[] {
  if (!reference.enough) return [];
  const t = options.thresholds ?? DEFAULT_THRESHOLDS;
  const notes: FleetNote[] = [];
  const whose = {
    baseline: `${subject.name}'s baseline`,
    log: `${subject.name}'s log (judged against the fleet, no baseline of its own)`,
    "log-beside-baseline": `${subject.name}'s log`,
  }[options.what];
  const fleetWords = `the median of ${reference.airframes} sister airframes of ${reference.design}`;
  for (const mode of reference.modes) {
    const window = SEARCH_WINDOW_FRACTION * mode.medianHz;
    const candidates = subject.modes.filter(
      (m) => m.axis === mode.axis && Math.abs(m.freqHz - mode.medianHz) <= window,
    );
    const nearest = candidates.sort(
      (a, b) => Math.abs(a.freqHz - mode.medianHz) - Math.abs(b.freqHz - mode.medianHz),
    )[0];
    if (!nearest) {
      if (mode.members.length >= COMMON_MODE_SHARE * reference.airframes) {
        notes.push({
          kind: "mode-missing",
          axis: mode.axis,
          freqHz: mode.medianHz,
          severity: "watch",
          text: `${whose} shows no ${AXIS_WORD[mode.axis]} mode near ${Math.round(mode.medianHz)} Hz, which ${mode.members.length} of ${reference.airframes} sister airframes have: check that arm and frame screws are tight`,
        });
      }
      continue;
    }
    const z = robustZ(
      nearest.freqHz,
      mode.medianHz,
      mode.sigmaHz,
      MIN_MODE_SIGMA_FRACTION * mode.medianHz,
    );
    const deviationPct = ((nearest.freqHz - mode.medianHz) / mode.medianHz) * 100;
    const step = stepOf(Math.abs(deviationPct), t.modeShiftPct);
    if (Math.abs(z) <= OUTLIER_Z || !step) continue;
    const side = deviationPct < 0 ? "below" : "above";
    const question =
      options.what === "baseline"
        ? deviationPct < 0
          ? "was the baseline taken after damage, or is a part on it softer?"
          : "was the baseline taken with a different part fitted, or is a part on it stiffer?"
        : deviationPct < 0
          ? "a lower mode than its sisters points to a crack or a loose arm or frame screw: inspect it"
          : "a higher mode than its sisters points to a different or over-tightened part: check what is fitted";
    notes.push({
      kind: "mode-off-fleet",
      axis: mode.axis,
      freqHz: round1(nearest.freqHz),
      fleetHz: round1(mode.medianHz),
      deviationPct: round1(deviationPct),
      z: round1(z),
      // Questioning a baseline is a prompt to look, not damage found: it stays at watch.
      severity: options.what === "baseline" ? "watch" : step,
      text: `${whose} ${AXIS_WORD[mode.axis]} mode at ${Math.round(nearest.freqHz)} Hz sits ${Math.abs(round1(deviationPct))} % ${side} ${fleetWords} (${Math.round(mode.medianHz)} Hz) — ${question}`,
    });
  }
  if (options.what !== "baseline") {
    const worstPerAxis = new Map<Axis, FleetNote>();
    for (const level of subject.levels) {
      const ref = reference.levels.find(
        (l) =>
          l.throttleBand === level.throttleBand && l.axis === level.axis && l.band === level.band,
      );
      if (!ref || ref.airframes < MIN_FLEET_AIRFRAMES) continue;
      const deltaDb = level.db - ref.medianDb;
      const z = robustZ(level.db, ref.medianDb, ref.sigmaDb, MIN_LEVEL_SIGMA_DB);
      const step = stepOf(deltaDb, t.levelDb);
      if (z <= OUTLIER_Z || !step) continue;
      const had = worstPerAxis.get(level.axis);
      if (had && (had.deltaDb ?? 0) >= deltaDb) continue;
      // One level note per axis, the largest rise: the rest say the same thing.
      worstPerAxis.set(level.axis, {
        kind: "level-above-fleet",
        axis: level.axis,
        band: level.band,
        throttleBand: level.throttleBand,
        deltaDb: round1(deltaDb),
        z: round1(z),
        severity: step,
        text: `${whose}: ${level.axis} vibration in the ${options.bandLabel(level.band)} band is ${round1(deltaDb)} dB above ${fleetWords} at ${options.throttleLabel(level.throttleBand)} throttle`,
      });
    }
    notes.push(...worstPerAxis.values());
  }
  return notes;
}

/** A fleet member from an airframe's active baseline: its structural modes and its band levels per throttle band. */
export function memberFromBaseline(id: string, name: string, baseline: Baseline): FleetMember {
  return {
    id,
    name,
    modes: baseline.modes.map((m) => ({ axis: m.axis, freqHz: m.freqHz })),
    levels: baseline.throttleBands.flatMap((tb) =>
      AXES.flatMap((axis) =>
        tb.axes[axis].bandDb.map((db, band) => ({ throttleBand: tb.index, axis, band, db })),
      ),
    ),
  };
}

/** A subject from one log, for an airframe with no baseline: its structural peaks and well-flown throttle bands. */
export function memberFromLog(id: string, name: string, analysis: LogAnalysis): FleetMember {
  return {
    id,
    name,
    modes: AXES.flatMap((axis) =>
      analysis.axes[axis].peaks
        .filter((p) => p.kind === "structural")
        .map((p) => ({ axis, freqHz: p.freqHz })),
    ),
    levels: analysis.throttleBands
      .filter((tb) => tb.segments >= DEFAULT_ANALYSIS.minBandSegments)
      .flatMap((tb) =>
        AXES.flatMap((axis) =>
          tb.axes[axis].bandDb.map((db, band) => ({ throttleBand: tb.index, axis, band, db })),
        ),
      ),
  };
}
