import { DEFAULT_ANALYSIS, floorCorner, throttleBandLabel } from "../analysis/settings";
import { orderGeneration, type LogAnalysis } from "../analysis/types";
import { AXES, type Axis } from "../logs/columns";
import type { Baseline } from "./baseline";
import { bandRises } from "./detectors/band-rise";
import type { DetectorContext, MatchedBand } from "./detectors/context";
import { floorRises, softFrameFloor } from "./detectors/floor-rise";
import { deepestDropPerMode, modeShifts } from "./detectors/mode-shift";
import { motorOrders } from "./detectors/motor-orders";
import { newPeaks } from "./detectors/new-resonance";
import { orderEvidence } from "./detectors/order-evidence";
import type { Assessment, Finding, NotCompared } from "./findings";
import { MOTOR_POSITIONS } from "./motor-positions";
import {
  DEFAULT_THRESHOLDS,
  scoreForPoints,
  statusForScore,
  worstStatus,
  type HealthThresholds,
} from "./thresholds";

export type { Assessment, Finding, FindingKind, NotCompared } from "./findings";

export interface CompareOptions {
  thresholds?: HealthThresholds;
  /** Names of motor positions for the sentences, e.g. { 3: "rear-right" }. */
  motorPositions?: Record<number, string>;
  /** Segments a throttle band of the log needs to be compared. Default: the analysis's minimum (8). */
  minBandSegments?: number;
}

/**
 * The log's and the baseline's top frequencies may differ by this much (Hz) and still count as
 * the same range: rounding of the rates fitted from the logs' time columns.
 */
const SAME_RANGE_HZ = 1;

/**
 * Compares one log with an airframe's baseline, like with like: only throttle bands that both
 * cover with enough data, only frequencies both logs can show, baseline levels interpolated to
 * the log's own mean throttle in each band. Harder flying moves time between bands; it does not
 * raise the level within a band, so it does not read as damage.
 * The detectors (lib/health/detectors/, one file each) share one context built here.
 */
export function compareWithBaseline(
  log: LogAnalysis,
  baseline: Baseline,
  options: CompareOptions = {},
): Assessment {
  const h = options.thresholds ?? DEFAULT_THRESHOLDS;
  const minSegments = options.minBandSegments ?? DEFAULT_ANALYSIS.minBandSegments;
  const notCompared: NotCompared[] = [];
  const maxHz = Math.min(log.settings.maxFreqHz, baseline.maxFreqHz);
  if (log.settings.maxFreqHz < baseline.maxFreqHz - SAME_RANGE_HZ) {
    notCompared.push({
      what: `above ${Math.round(maxHz)} Hz`,
      reason: `this log was recorded at ${Math.round(log.sampleRateHz)} Hz and cannot show higher frequencies`,
    });
  } else if (baseline.maxFreqHz < log.settings.maxFreqHz - SAME_RANGE_HZ) {
    notCompared.push({
      what: `above ${Math.round(maxHz)} Hz`,
      reason: `the baseline logs were recorded at ${Math.round(baseline.sampleRateHz)} Hz`,
    });
  }
  if (log.hasThrottle !== baseline.hasThrottle) {
    notCompared.push({
      what: "throttle matching",
      reason:
        "only one of this log and the baseline has a throttle column; levels are compared over the whole log",
    });
  }

  const axes = usableAxes(log, baseline, notCompared);
  if (axes.length === 0)
    return unscored(
      notCompared,
      "no gyro axis carries a usable signal in both this log and the baseline, so the log is unusable and has no score",
    );

  const matched = matchedBands(log, baseline, minSegments, notCompared);
  if (matched.length === 0)
    return unscored(
      notCompared,
      "no throttle band has enough flying in both this log and the baseline",
    );

  const inputs = { log, baseline, thresholds: h, axes, matched, maxHz };
  const ctx: DetectorContext = {
    ...inputs,
    // Both floors over the same range: the baseline's corner, lowered like the analysis does for
    // a log that cannot reach it, up to the top both can show.
    cornerHz: floorCorner(baseline, maxHz),
    positions: options.motorPositions ?? {},
    orders: orderEvidence(inputs, untrustedMotors(log, baseline, h, notCompared)),
    found: [],
  };
  // The detectors run in this order, each told what the ones before it found: a motor named by
  // the floor rise for its bearing tones is not named twice, a moved mode is not also a new peak,
  // and a band that a more specific finding explains is not a band rise. Once all have run, a
  // floor rise that came with two or more dropped modes points at the frame.
  const shifts = modeShifts(ctx);
  const floor = floorRises(ctx);
  const orders = motorOrders({ ...ctx, found: floor });
  const found: Finding[] = [...shifts, ...orders, ...floor];
  found.push(...newPeaks({ ...ctx, found: [...found] }));
  found.push(...bandRises({ ...ctx, found: [...found] }));
  const findings = softFrameFloor(deepestDropPerMode(found), h.samePeakFraction);
  // Worst first; the sort is stable, so equal points keep the order above.
  findings.sort((a, b) => b.points - a.points);

  const taken = findings.reduce((s, f) => s + f.points, 0);
  const score = scoreForPoints(taken);
  let status = statusForScore(score, h);
  for (const f of findings) status = worstStatus(status, f.severity);
  return { score, status, findings, notCompared, comparedBands: matched.map((m) => m.label) };
}

/**
 * The axes with a usable signal in both the log and the baseline. An axis without one is not
 * compared: a log of zeros or of a stuck gyro must never read as a quiet, healthy airframe.
 */
function usableAxes(log: LogAnalysis, baseline: Baseline, notCompared: NotCompared[]): Axis[] {
  return AXES.filter((axis) => {
    const problem =
      log.axes[axis].signal?.usable === false ? log.axes[axis].signal?.text : undefined;
    if (problem)
      notCompared.push({ what: `${axis} axis`, reason: `not usable in this log: ${problem}` });
    const inBaseline = baseline.unusableAxes?.find((u) => u.axis === axis);
    if (inBaseline && !problem)
      notCompared.push({
        what: `${axis} axis`,
        reason: `not usable in the baseline: ${inBaseline.reason}`,
      });
    return !problem && !inBaseline;
  });
}

/** The log's throttle bands with enough segments that the baseline also has; why the others are not. */
function matchedBands(
  log: LogAnalysis,
  baseline: Baseline,
  minSegments: number,
  notCompared: NotCompared[],
): MatchedBand[] {
  const matched: MatchedBand[] = [];
  for (const band of log.throttleBands) {
    const label = throttleBandLabel(band.lo, band.hi);
    const base = baseline.throttleBands.find((b) => b.index === band.index);
    if (band.segments < minSegments) {
      if (band.segments > 0 && base)
        notCompared.push({
          what: `throttle ${label}`,
          reason: `only ${band.seconds.toFixed(1)} s in this log`,
        });
      continue;
    }
    if (!base) {
      notCompared.push({
        what: `throttle ${label}`,
        reason: "the baseline has no flying in this band",
      });
      continue;
    }
    matched.push({ log: band, base, label });
  }
  return matched;
}

/**
 * Motors whose rpm telemetry was masked for too much of this log or of a baseline log: their
 * orders are not compared (a level from the few believable blocks would be biased towards the
 * flying where the telemetry happens to work), and the reason is listed.
 */
function untrustedMotors(
  log: LogAnalysis,
  baseline: Baseline,
  h: HealthThresholds,
  notCompared: NotCompared[],
): Set<number> {
  const out = new Set<number>();
  // Orders measured two ways (before and after analysis version 3) differ by tens of dB.
  const logGeneration = orderGeneration(log.version);
  const baseGeneration = baseline.orderGeneration ?? 1;
  if (log.motors.length > 0 && baseline.motors.length > 0 && logGeneration !== baseGeneration) {
    for (const m of baseline.motors) out.add(m);
    notCompared.push({
      what: "motor orders",
      reason:
        baseGeneration === 0
          ? "the baseline's logs were analysed by different versions of heatcheck; analyse them again, then set the baseline again, to compare motor orders"
          : logGeneration > baseGeneration
            ? "the baseline's logs were analysed by an earlier version of heatcheck, which measured motor orders another way; analyse them again, then set the baseline again, to compare them"
            : "this log was analysed by an earlier version of heatcheck, which measured motor orders another way; analyse it again to compare them",
    });
    return out;
  }
  for (const m of log.motors) {
    const share = m.maskedShare ?? 0;
    if (share <= h.maxMaskedShare) continue;
    out.add(m.motor);
    const counts = m.maskedBlocks;
    const why = counts
      ? Object.entries(counts)
          .filter(([, n]) => n > 0)
          .sort((a, b) => b[1] - a[1])
          .map(([r]) => MASK_WORDS[r] ?? r)
          .join(", ")
      : "";
    notCompared.push({
      what: `motor ${m.motor} orders`,
      reason: `its rpm telemetry could not be believed in ${Math.round(share * 100)} % of the log${why ? ` (${why})` : ""}`,
    });
  }
  for (const motor of baseline.untrustedMotors ?? []) {
    if (out.has(motor)) continue;
    out.add(motor);
    notCompared.push({
      what: `motor ${motor} orders`,
      reason: "its rpm telemetry could not be believed in most of a baseline log",
    });
  }
  return out;
}

const MASK_WORDS: Record<string, string> = {
  zero: "reads 0",
  range: "outside what a motor can spin",
  stuck: "stuck at one value",
  slew: "jumps faster than a motor can accelerate",
};

/**
 * A log that could not be judged: no score (NaN, null in JSON and the database) and never ok,
 * because "nothing to see" is not "healthy".
 */
function unscored(notCompared: NotCompared[], reason: string): Assessment {
  return {
    score: Number.NaN,
    status: "watch",
    findings: [],
    notCompared: [...notCompared, { what: "whole log", reason }],
    comparedBands: [],
  };
}

/**
 * The comparison as every screen, the worker and the CLI make it: compareWithBaseline with the
 * motors named by position (MOTOR_POSITIONS) in the sentences.
 */
export function compareWithPositions(log: LogAnalysis, baseline: Baseline): Assessment {
  return compareWithBaseline(log, baseline, { motorPositions: MOTOR_POSITIONS });
}
